import { NotFoundPanel } from "@/components/site-provisioning-kit";

export default function AlarmNotFound() {
  return <NotFoundPanel what="Alarm" backHref="/alarms" backLabel="Back to the alarms" />;
}
