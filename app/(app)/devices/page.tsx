import type { Metadata } from "next";
import Link from "next/link";
import { Suspense } from "react";
import { requirePageUser } from "@/lib/auth/session";
import { can } from "@/lib/auth/permissions";
import { PageHeader } from "@/components/ui/page-header";
import { Loading } from "@/components/ui/data-state";
import { DeviceTable } from "@/components/devices/device-table";

export const metadata: Metadata = { title: "Devices" };

export default async function DevicesPage() {
  const user = await requirePageUser();
  return (
    <>
      <PageHeader
        title="Devices"
        path={[{ href: "/", label: "Overview" }]}
        facts="Field units, their signal profile and channels, and when each last reported."
        actions={can(user.role, "device:manage") && <Link href="/devices/new" className="btn">Add a device</Link>}
      />
      <Suspense fallback={<Loading />}>
        <DeviceTable />
      </Suspense>
    </>
  );
}
