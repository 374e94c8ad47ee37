import { wholeOrganisation } from "@/lib/db/site-scope";
import type { Metadata } from "next";
import Link from "next/link";
import { currentUser } from "@/lib/auth/session";
import { ackLinkProblemMessage, lookUpAckLink } from "@/lib/services/notifications";
import { findAlarm } from "@/lib/services/alarms";
import { needsAcknowledgement } from "@/lib/alarms/engine";
import type { AlarmState } from "@/lib/alarms/state-machine";
import { formatSiteTime } from "@/lib/mail/alarm-mail";
import { Wordmark } from "@/components/shell/wordmark";
import { AlarmCaution } from "@/components/alarms/alarm-caution";
import { AlarmStateLabel, alarmFigure } from "@/components/alarms/alarm-badges";
import { effectiveDisplaySettingsOfUsers } from "@/lib/services/display-settings";
import { DEFAULT_DISPLAY_SETTINGS, figureOptionsOf } from "@/lib/format/display";
import { figuresFor } from "@/lib/format/figures";
import { PriorityBadge } from "@/components/ui/priority-badge";
import { AlarmAckConfirm, AlarmFacts } from "@/components/alarms/alarm-ack-confirm";
import { alarmStateWord } from "@/lib/alarms/vocabulary";

export const metadata: Metadata = { title: "Acknowledge an alarm", robots: { index: false, follow: false } };
export const dynamic = "force-dynamic";

// Opening the link only shows what it would acknowledge; the button below does it (a POST), so a mail
// scanner that follows links acknowledges nothing.
export default async function AckPage({ params }: { params: Promise<{ token: string }> }) {
  const token = decodeURIComponent((await params).token);
  const viewer = await currentUser();
  const link = await lookUpAckLink(token, viewer?.organisationId ?? null);
  const alarm = link.ok ? await findAlarm(wholeOrganisation(link.organisationId), link.alarmId) : null;
  // The figures as the link's recipient reads them (their e-mail used the same settings).
  const display = link.ok ? (await effectiveDisplaySettingsOfUsers([link.recipient.id])).get(link.recipient.id) : undefined;
  const fig = figuresFor(figureOptionsOf(display ?? DEFAULT_DISPLAY_SETTINGS));
  const details = alarm && (
    <>
      <dt className="font-bold">Alarm</dt>
      <dd><PriorityBadge priority={alarm.priority} calm={alarm.state === "normal"} /> {alarm.label}</dd>
      <dt className="font-bold">Site</dt>
      <dd>{alarm.site.name}</dd>
      <dt className="font-bold">Asset</dt>
      <dd>{alarm.asset?.name ?? (alarm.channel ? `${alarm.channel.device_name}, channel ${alarm.channel.index}` : "—")}</dd>
      <dt className="font-bold">Value / setpoint</dt>
      <dd className="figures">{alarmFigure(fig, alarm.value, alarm.unit, alarm.kind)}{alarm.setpoint !== null && ` / ${alarmFigure(fig, alarm.setpoint, alarm.unit, alarm.kind)}`}</dd>
      <dt className="font-bold">Since</dt>
      <dd className="figures">{alarm.activated_at ? formatSiteTime(new Date(alarm.activated_at), alarm.site.time_zone) : "—"}</dd>
    </>
  );
  return (
    <main className="flex min-h-screen items-center justify-center px-4 py-8">
      <div className="w-full max-w-md">
        <Wordmark className="mb-8" />
        {link.ok && alarm ? (
          <>
            {needsAcknowledgement(alarm.state as AlarmState) ? (
              <AlarmAckConfirm token={token} recipient={link.recipient.email} state={alarm.state as AlarmState} details={details}>
                The acknowledgement is recorded as {link.recipient.name} ({link.recipient.email}). This link works once.
              </AlarmAckConfirm>
            ) : (
              <>
                <h1 className="mb-4 text-2xl font-bold">Nothing to acknowledge</h1>
                <AlarmFacts details={details} state={<AlarmStateLabel state={alarm.state as AlarmState} />} />
                <p role="status" className="border-l-4 border-rule bg-card px-3 py-2">
                  This alarm is {alarmStateWord(alarm.state).toLowerCase()}
                  {alarm.acknowledged_by ? `, acknowledged by ${alarm.acknowledged_by.email}` : ""}. Nothing was changed.
                </p>
              </>
            )}
            <div className="mt-6"><AlarmCaution /></div>
          </>
        ) : (
          <>
            <h1 className="mb-2 text-2xl font-bold">This link cannot be used</h1>
            <p role="alert" className="mb-6">{ackLinkProblemMessage(link.ok ? "unknown" : link.reason)}</p>
            <Link href="/alarms" className="btn-quiet">Go to the alarms</Link>
          </>
        )}
      </div>
    </main>
  );
}
