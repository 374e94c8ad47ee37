import type { Metadata } from "next";
import { Suspense } from "react";
import { requirePageUser } from "@/lib/auth/session";
import { can } from "@/lib/auth/permissions";
import { PageHeader } from "@/components/ui/page-header";
import { Loading } from "@/components/ui/data-state";
import { RefillPlanTable } from "@/components/assets/refill-plan-table";

export const metadata: Metadata = { title: "Refill plan" };

export default async function RefillPlanPage() {
  const user = await requirePageUser("dashboard:read");
  return (
    <>
      <PageHeader
        title="Refill plan"
        path={[{ href: "/", label: "Overview" }]}
        facts="Tanks that reach their reorder level within the horizon, soonest first, with the volume to bring them to safe fill."
      />
      <Suspense fallback={<Loading />}>
        <RefillPlanTable canExport={can(user.role, "export:read")} />
      </Suspense>
    </>
  );
}
