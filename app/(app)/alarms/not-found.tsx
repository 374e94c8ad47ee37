import { NotFoundPanel } from "@/components/ui/form-fields";

export default function AlarmNotFound() {
  return <NotFoundPanel what="Alarm" backHref="/alarms" backLabel="Back to the alarms" />;
}
