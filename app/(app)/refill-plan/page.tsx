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
        facts="What each tank needs within the horizon by its purpose: deliveries, pump-outs and top-ups, soonest first, and the tanks that need a check before anything is scheduled."
      />
      <Suspense fallback={<Loading />}>
        <RefillPlanTable canExport={can(user.role, "export:read")} />
      </Suspense>
    </>
  );
}
