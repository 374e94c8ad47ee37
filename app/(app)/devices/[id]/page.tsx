import type { Metadata } from "next";
import Link from "next/link";
import { requirePageUser } from "@/lib/auth/session";
import { can } from "@/lib/auth/permissions";
import { findDevice } from "@/lib/services/devices";
import { findOrNotFound } from "@/lib/http/not-found";
import { PageHeader } from "@/components/ui/page-header";
import { DeviceDetail } from "@/components/devices/device-detail";
import { MaintenanceButton } from "@/components/alarms/maintenance-button";

export const metadata: Metadata = { title: "Device" };

export default async function DevicePage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser();
  const { id } = await params;
  const { device } = await findOrNotFound(id, (id) => findDevice(user.scope, id));
  const canManage = can(user.role, "device:manage");
  return (
    <>
      <PageHeader
        title={device.name}
        path={[{ href: "/devices", label: "Devices" }]}
        facts={<>Serial <span className="figures">{device.serial}</span> · {device.profile}</>}
        actions={canManage && <Link href={`/devices/${id}/edit`} className="btn-quiet">Edit device</Link>}
      />
      {can(user.role, "alarm:shelve") && <MaintenanceButton scope="device" id={id} mayTakeOutOfService={can(user.role, "alarm:out_of_service")} />}
      <DeviceDetail id={id} canManage={canManage} />
    </>
  );
}
