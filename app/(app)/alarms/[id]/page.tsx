import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/session";
import { findAlarm } from "@/lib/services/alarms";
import { findOrNotFound } from "@/lib/http/not-found";
import { PageHeader } from "@/components/ui/page-header";
import { AlarmCaution } from "@/components/alarms/alarm-caution";
import { AlarmDetail } from "@/components/alarms/alarm-detail";

export const metadata: Metadata = { title: "Alarm" };

export default async function AlarmPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser();
  const { id } = await params;
  const alarm = await findOrNotFound(id, (id) => findAlarm(user.scope, id));
  const where = alarm.asset?.name ?? (alarm.channel ? `${alarm.channel.device_name} channel ${alarm.channel.index}` : alarm.site.name);
  return (
    <>
      <PageHeader
        title={`${alarm.label} · ${where}`}
        path={[{ href: "/alarms", label: "Alarms" }, { href: `/alarms?site_id=${alarm.site.id}`, label: alarm.site.name }]}
        facts={`Site time zone ${alarm.site.time_zone}.`}
      />
      <AlarmCaution />
      <AlarmDetail id={id} role={user.role} />
    </>
  );
}
