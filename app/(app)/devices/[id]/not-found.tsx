import { NotFoundPanel } from "@/components/site-provisioning-kit";

export default function DeviceNotFound() {
  return <NotFoundPanel what="Device" backHref="/devices" backLabel="Back to the devices" />;
}
