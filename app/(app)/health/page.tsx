import type { Metadata } from "next";
import { Suspense } from "react";
import { requirePageUser } from "@/lib/auth/session";
import { PageHeader } from "@/components/ui/page-header";
import { Loading } from "@/components/ui/data-state";
import { DeviceHealthTable } from "@/components/devices/device-health-table";

export const metadata: Metadata = { title: "Device health" };

export default async function DeviceHealthPage() {
  await requirePageUser();
  return (
    <>
      <PageHeader
        title="Device health"
        path={[{ href: "/", label: "Overview" }]}
        facts="When each device was last heard, its battery and signal, and the sensor faults of each channel. Offline after three expected intervals without a reading."
      />
      <Suspense fallback={<Loading />}>
        <DeviceHealthTable />
      </Suspense>
    </>
  );
}
