import { formatDate, formatDateTime, formatTime, type TimeDisplay } from "@/lib/format/time";

/** One notice about an alarm as GET /api/alarms/{id} answers it: where its e-mail got to. */
export interface NoticeDeliveryJson {
  recipient_name: string;
  /** Null for a viewer: staff addresses are shown to staff only. */
  email: string | null;
  attempts: number;
  sent_at: string | null;
  send_error: string | null;
  next_attempt_at: string | null;
  held_reason: "cleared_before_notice" | "no_longer_needed" | "link_expired" | null;
}

const HELD_WORDS: Record<NonNullable<NoticeDeliveryJson["held_reason"]>, string> = {
  cleared_before_notice: "not sent: the alarm cleared before it could go out",
  no_longer_needed: "not sent: acknowledged or activated again before it could go out",
  link_expired: "not delivered: its acknowledge link expired, no more attempts",
};

/** A time in the site's zone, with the date only when it is not today there: "14:05 GMT", "5 Dec 2026, 02:10 GMT". */
function when(at: string, d: TimeDisplay, now: Date): string {
  return formatDate(at, d) === formatDate(now, d) ? formatTime(at, d) : formatDateTime(at, d);
}

/** "E-mail to Tess delivered 14:02 GMT", "E-mail to Tess not delivered yet, retrying at 14:05 GMT (attempt 3)". */
export function describeNoticeDelivery(n: NoticeDeliveryJson, timeZone: string, now = new Date()): string {
  const d: TimeDisplay = { locale: "en-GB", timeZone, hourCycle: "h23" };
  const who = `E-mail to ${n.recipient_name}`;
  if (n.sent_at) return `${who} delivered ${when(n.sent_at, d, now)}${n.attempts > 1 ? ` (attempt ${n.attempts})` : ""}`;
  if (n.held_reason) return `${who} ${HELD_WORDS[n.held_reason]}`;
  if (n.attempts === 0) return `${who} queued, not sent yet`;
  const retry = n.next_attempt_at ? `retrying at ${when(n.next_attempt_at, d, now)}` : "retrying";
  return `${who} not delivered yet, ${retry} (attempt ${n.attempts + 1})`;
}

/** The delivery state of one alarm e-mail, with the last error on hover for the curious. */
export function NoticeDelivery({ notice, timeZone }: { notice: NoticeDeliveryJson; timeZone: string }) {
  const failing = !notice.sent_at && notice.attempts > 0 && !notice.held_reason;
  return (
    <span className={failing ? "font-semibold" : undefined} title={notice.send_error ?? undefined}>
      {failing ? "▲ " : ""}
      {describeNoticeDelivery(notice, timeZone)}
    </span>
  );
}
