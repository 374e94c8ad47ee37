import { NotFoundPanel } from "@/components/ui/form-fields";

export default function DeviceNotFound() {
  return <NotFoundPanel what="Device" backHref="/devices" backLabel="Back to the devices" />;
}
