import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/session";
import { findDevice } from "@/lib/services/devices";
import { findOrNotFound } from "@/lib/http/not-found";
import { PageHeader } from "@/components/ui/page-header";
import { DeviceEditor } from "@/components/devices/device-form";

export const metadata: Metadata = { title: "Edit device" };

export default async function EditDevicePage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser("device:manage");
  const { id } = await params;
  const { device } = await findOrNotFound(id, (id) => findDevice(user.scope, id));
  return (
    <>
      <PageHeader
        title={`Edit ${device.name}`}
        path={[{ href: "/devices", label: "Devices" }, { href: `/devices/${id}`, label: device.name }]}
      />
      <DeviceEditor id={id} />
    </>
  );
}
