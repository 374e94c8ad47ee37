import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/session";
import { PageHeader } from "@/components/ui/page-header";
import { DeviceForm } from "@/components/devices/device-form";

export const metadata: Metadata = { title: "Add a device" };

export default async function NewDevicePage() {
  await requirePageUser("device:manage");
  return (
    <>
      <PageHeader title="Add a device" path={[{ href: "/devices", label: "Devices" }]} facts="Its API key is shown once, after you add it." />
      <DeviceForm />
    </>
  );
}
