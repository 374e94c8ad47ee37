import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { requirePageUser } from "@/lib/auth/session";
import { findDevice } from "@/lib/db/queries/devices";
import { HttpError } from "@/lib/http/errors";
import { isUuid } from "@/lib/validations/common";
import { PageHeader } from "@/components/ui/page-header";
import { DeviceEditor } from "@/components/devices/device-form";

export const metadata: Metadata = { title: "Edit device" };

export default async function EditDevicePage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser("device:manage");
  const { id } = await params;
  if (!isUuid(id)) notFound();
  const { device } = await findDevice(user.organisationId, id).catch((e) => {
    if (e instanceof HttpError && e.status === 404) notFound();
    throw e;
  });
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
