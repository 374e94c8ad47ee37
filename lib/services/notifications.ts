// Alarm notices as an outbox. Planning (lib/alarms/engine-notify.ts) runs in the transaction that
// changed the alarms: it stores one notification row per alarm episode and recipient (the unique key
// keeps it to one e-mail each, even with two workers) and adds one `send-alarm-mail` job per e-mail in
// that same transaction. The job sends after the commit; a failed send is recorded and retried by
// graphile-worker with exponential backoff until the acknowledge link would expire. Every attempt is
// an alarm event. The e-mail says the alarm's state when it goes out; a first notice whose alarm
// cleared meanwhile is held back, not sent as needing attention. A link names its notification, is
// signed and expires; the row binds it to the recipient and to the episode it was sent for.

import { randomUUID } from "node:crypto";
import type { Transaction } from "sequelize";
import { getSequelize } from "../db/sequelize";
import { writeAudit } from "./audit";
import { can, type Role } from "../auth/permissions";
import { createSignedToken, verifySignedToken } from "../auth/invite-token";
import { alarmKindLabel, applyAlarmInput, needsAcknowledgement, type AlarmKind } from "../alarms/engine";
import { firstNoticeHold, groupIntoMails, planNotifications, type OnCallPerson, NOTIFY_MAX_AGE_HOURS } from "../alarms/engine-notify";
import { ALARM_PRIORITIES, type AlarmPriority } from "../alarms/state-machine";
import { composeAlarmMail, type AlarmMailItem } from "../mail/alarm-mail";
import { DEFAULT_DISPLAY_SETTINGS } from "../format/display";
import { effectiveDisplaySettingsOfUsers } from "./display-settings";
import { appUrl, sendMail } from "../mail/send-mail";
import { type AlarmDbRow, insertAlarmEvents, saveAlarm, toRecord } from "./alarm-store";
import { sqlRows } from "../db/sql";
import { RAISED_IN_MAINTENANCE } from "./maintenance-windows";
import { addJob, JOBS } from "./job-queue";
import { formatDateTime } from "../format/time";

export const ACK_LINK_PURPOSE = "alarm-ack";
/** How long an acknowledge link works (Halftrip's choice: a day covers a night shift and the morning after). */
export const ACK_LINK_TTL_HOURS = 24;
/**
 * graphile-worker's limit on a send job's attempts. The stop that matters is the link's expiry: its
 * backoff waits e^n seconds after the n-th failure (at most e^10 s, about 6 h), so the 13th attempt is
 * already past 24 h; 25 only keeps the job from giving up first.
 */
const SEND_JOB_MAX_ATTEMPTS = 25;
/** Serialises planning between workers, so two never queue the same notice (transaction-scoped advisory lock). */
const PLANNING_LOCK = 7_341_001;

interface CandidateRow {
  id: string;
  site_id: string;
  episode: number;
  state: AlarmDbRow["state"];
  activated_at: Date | null;
  cleared_at: Date | null;
  evaluated_until: Date | null;
}

interface OnCallRow {
  site_id: string;
  position: number;
  user_id: string;
  email: string;
  role: Role;
  status: string;
  user_organisation_id: string;
  site_organisation_id: string;
}

/**
 * Plans the notices due now and queues them (rows and their send jobs) in the caller's transaction,
 * which is the one that changed the alarms. `wait: false` (inside a worker's batch) skips planning when
 * another worker is planning right now; the next cycle's planning picks up what it left.
 */
export async function queueDueNotices(transaction: Transaction, now: Date, { wait }: { wait: boolean }): Promise<number> {
  const [lock] = await sqlRows<{ locked: boolean }>(
    wait ? `SELECT pg_advisory_xact_lock(:key) IS NOT NULL AS locked` : `SELECT pg_try_advisory_xact_lock(:key) AS locked`,
    { key: PLANNING_LOCK },
    { transaction },
  );
  if (!lock.locked) return 0;
  const candidates = await sqlRows<CandidateRow>(
    `SELECT al.id, al.site_id, al.episode, al.state, al.activated_at, al.cleared_at, al.evaluated_until FROM alarms al
     WHERE al.state IN ('unacknowledged', 'returned_unacknowledged') AND al.episode > 0
       AND al.activated_at >= CAST(:now AS timestamptz) - make_interval(hours => :maxAge)
       AND NOT ${RAISED_IN_MAINTENANCE}`,
    { now, maxAge: NOTIFY_MAX_AGE_HOURS },
    { transaction },
  );
  if (candidates.length === 0) return 0;
  const siteIds = [...new Set(candidates.map((c) => c.site_id))];
  const onCallRows = await sqlRows<OnCallRow>(
    `SELECT oc.site_id, oc.position, u.id AS user_id, u.email, u.role, u.status, u.organisation_id AS user_organisation_id,
            s.organisation_id AS site_organisation_id
     FROM on_call_entries oc JOIN users u ON u.id = oc.user_id JOIN sites s ON s.id = oc.site_id
     WHERE oc.site_id IN (:siteIds) ORDER BY oc.site_id, oc.position`,
    { siteIds },
    { transaction },
  );
  const siteRows = await sqlRows<{ id: string; escalation_delay_min: number }>(`SELECT id, escalation_delay_min FROM sites WHERE id IN (:siteIds)`, { siteIds }, { transaction });
  const sentRows = await sqlRows<{ alarm_id: string; episode: number; user_id: string; sent_at: Date | null; held_reason: string | null }>(
    `SELECT alarm_id, episode, user_id, sent_at, held_reason FROM alarm_notifications WHERE alarm_id IN (:ids)`,
    { ids: candidates.map((c) => c.id) },
    { transaction },
  );
  const onCall = new Map<string, OnCallPerson[]>();
  for (const r of onCallRows) {
    const eligible = r.status === "active" && can(r.role, "alarm:acknowledge") && r.user_organisation_id === r.site_organisation_id;
    onCall.set(r.site_id, [...(onCall.get(r.site_id) ?? []), { userId: r.user_id, email: r.email, position: r.position, eligible }]);
  }
  const planned = planNotifications({
    alarms: candidates.map((c) => ({
      alarmId: c.id,
      siteId: c.site_id,
      episode: c.episode,
      state: c.state,
      activatedAt: c.activated_at,
      clearedAt: c.cleared_at,
      evaluatedUntil: c.evaluated_until,
    })),
    onCall,
    escalationDelayMin: new Map(siteRows.map((s) => [s.id, s.escalation_delay_min])),
    // A notice held back counts as given just now, every time: nobody is e-mailed about that episode again (no escalation).
    sent: sentRows.map((s) => ({ alarmId: s.alarm_id, episode: s.episode, userId: s.user_id, sentAt: s.sent_at ?? (s.held_reason ? now : null) })),
    now,
  });
  const expiresAt = new Date(now.getTime() + ACK_LINK_TTL_HOURS * 3_600_000);
  let queued = 0;
  for (const mail of groupIntoMails(planned)) {
    const rows = mail.notices.map((n) => ({ id: randomUUID(), alarm_id: n.alarmId, episode: n.episode, user_id: n.userId, email: n.email, position: n.position, reason: n.reason }));
    const claimed = await sqlRows<{ id: string }>(
      `INSERT INTO alarm_notifications (id, organisation_id, alarm_id, episode, user_id, email, position, reason, expires_at)
       SELECT r.id, al.organisation_id, al.id, r.episode, r.user_id, r.email, r.position, r.reason, :expiresAt
       FROM json_to_recordset(CAST(:rows AS json)) AS r(id uuid, alarm_id uuid, episode int, user_id uuid, email text, position int, reason text)
       JOIN alarms al ON al.id = r.alarm_id
       ON CONFLICT (alarm_id, episode, user_id) DO NOTHING
       RETURNING id`,
      { rows: JSON.stringify(rows), expiresAt },
      { transaction },
    );
    if (claimed.length === 0) continue;
    await addJob(JOBS.sendAlarmMail, { notificationIds: claimed.map((c) => c.id) }, { transaction, maxAttempts: SEND_JOB_MAX_ATTEMPTS });
    queued += claimed.length;
  }
  return queued;
}

/** Planning in a transaction of its own: escalations falling due, and alarms changed outside a batch. */
export async function queueDueNoticesNow(now = new Date()): Promise<number> {
  return getSequelize().transaction((transaction) => queueDueNotices(transaction, now, { wait: true }));
}

function ackUrl(notificationId: string, expiresAt: Date): string {
  return `${appUrl()}/ack/${encodeURIComponent(createSignedToken(notificationId, expiresAt, ACK_LINK_PURPOSE))}`;
}

interface QueuedNoticeRow {
  id: string;
  organisation_id: string;
  alarm_id: string;
  episode: number;
  user_id: string;
  email: string;
  position: number;
  reason: "activation" | "escalation";
  expires_at: Date;
  attempts: number;
  recipient_name: string;
  alarm_episode: number;
  state: AlarmDbRow["state"];
  cleared_at: Date | null;
  time_zone: string;
}

interface MailAlarmRow {
  id: string;
  kind: AlarmKind;
  priority: AlarmPriority;
  state: AlarmDbRow["state"];
  setpoint: number | null;
  unit: string | null;
  activated_at: Date | null;
  cleared_at: Date | null;
  asset_id: string | null;
  asset_name: string | null;
  channel_index: number | null;
  device_name: string | null;
  site_name: string;
  time_zone: string;
  activation_value: number | null;
  activation_at: Date | null;
  activation_u: number | null;
  latest_value: number | null;
  latest_at: Date | null;
  latest_u: number | null;
}

/** Why a queued notice is not sent after all (null: send it). */
function holdReason(n: QueuedNoticeRow, now: Date): "cleared_before_notice" | "no_longer_needed" | "link_expired" | null {
  if (n.alarm_episode !== n.episode || !needsAcknowledgement(n.state)) return "no_longer_needed";
  if (n.reason === "activation" && firstNoticeHold({ alarmId: n.alarm_id, siteId: "", episode: n.episode, state: n.state, activatedAt: null, clearedAt: n.cleared_at }, now) === "cleared_before_notice") {
    return "cleared_before_notice";
  }
  if (new Date(n.expires_at) <= now) return "link_expired";
  return null;
}

const HOLD_CAUSES = {
  cleared_before_notice: "cleared before its e-mail went out, so it is not e-mailed as needing attention",
  no_longer_needed: "acknowledged or superseded by a new activation before its e-mail went out",
  link_expired: "its acknowledge link expired before an e-mail could be delivered; no more attempts",
} as const;

/**
 * The facts an e-mail states, read when it goes out: the state now, the value and time at activation
 * (the episode's first event), and for level alarms the latest measured level with its uncertainty.
 */
async function loadMailAlarms(ids: readonly string[], transaction: Transaction): Promise<Map<string, MailAlarmRow>> {
  const rows = await sqlRows<MailAlarmRow>(
    `SELECT al.id, al.kind, al.priority, al.state, al.setpoint, al.unit, al.activated_at, al.cleared_at, al.asset_id,
            a.name AS asset_name, ch.index AS channel_index, d.name AS device_name, s.name AS site_name, s.time_zone,
            act.value AS activation_value, act.at AS activation_at, act_m.uncertainty_m AS activation_u,
            latest.level_m AS latest_value, latest.at AS latest_at, latest.uncertainty_m AS latest_u
     FROM alarms al JOIN sites s ON s.id = al.site_id LEFT JOIN assets a ON a.id = al.asset_id
     LEFT JOIN channels ch ON ch.id = al.channel_id LEFT JOIN devices d ON d.id = ch.device_id
     LEFT JOIN LATERAL (SELECT e.value, e.at FROM alarm_events e WHERE e.alarm_id = al.id AND e.episode = al.episode
                         AND e.kind IN ('activated', 're_alarmed') ORDER BY e.at, e.id LIMIT 1) act ON true
     LEFT JOIN LATERAL (SELECT m.level_m, m.at, m.uncertainty_m FROM measurements m JOIN channels c ON c.id = m.channel_id
                         WHERE al.unit = 'm' AND c.asset_id = al.asset_id AND m.level_m IS NOT NULL ORDER BY m.at DESC LIMIT 1) latest ON true
     LEFT JOIN LATERAL (SELECT m.uncertainty_m FROM measurements m JOIN channels c ON c.id = m.channel_id
                         WHERE al.unit = 'm' AND c.asset_id = al.asset_id AND m.at <= coalesce(act.at, al.activated_at) AND m.level_m IS NOT NULL
                         ORDER BY m.at DESC LIMIT 1) act_m ON true
     WHERE al.id IN (:ids)`,
    { ids },
    { transaction },
  );
  return new Map(rows.map((r) => [r.id, r]));
}

function mailItem(a: MailAlarmRow, n: QueuedNoticeRow): AlarmMailItem {
  const activatedAt = a.activation_at ?? a.activated_at ?? new Date();
  return {
    condition: alarmKindLabel(a.kind),
    priority: a.priority,
    assetName: a.asset_name,
    channelLabel: a.device_name !== null ? `${a.device_name}, channel ${a.channel_index}` : null,
    state: a.state === "unacknowledged" ? "active" : "cleared",
    clearedAt: a.state === "unacknowledged" ? null : a.cleared_at,
    activation: { value: a.activation_value, at: activatedAt, uncertainty: a.activation_u },
    latest: a.latest_at ? { value: a.latest_value, at: a.latest_at, uncertainty: a.latest_u } : null,
    setpoint: a.setpoint,
    unit: a.unit,
    assetUrl: a.asset_id ? `${appUrl()}/assets/${a.asset_id}` : null,
    ackUrl: ackUrl(n.id, new Date(n.expires_at)),
    escalation: n.reason === "escalation",
  };
}

export interface SendAttempt {
  sent: number;
  held: number;
  /** The send's error; the job throws it after the commit so graphile-worker tries again later. */
  error: string | null;
}

/**
 * The `send-alarm-mail` job: sends one e-mail for its notices still waiting, after the transaction
 * that queued them committed, and records the attempt (notification row and alarm events) in one
 * transaction. `attempt` is the job's attempt number; graphile-worker retries a failed attempt after
 * e^attempt seconds, which the row keeps as `next_attempt_at` for the alarm page.
 */
export async function sendQueuedAlarmMail(notificationIds: readonly string[], attempt: number, now = new Date()): Promise<SendAttempt> {
  return getSequelize().transaction(async (transaction) => {
    const notices = await sqlRows<QueuedNoticeRow>(
      `SELECT n.id, n.organisation_id, n.alarm_id, n.episode, n.user_id, n.email, n.position, n.reason, n.expires_at, n.attempts,
              coalesce(nullif(u.name, ''), u.email) AS recipient_name, al.episode AS alarm_episode, al.state, al.cleared_at, s.time_zone
       FROM alarm_notifications n JOIN users u ON u.id = n.user_id JOIN alarms al ON al.id = n.alarm_id JOIN sites s ON s.id = al.site_id
       WHERE n.id IN (:ids) AND n.sent_at IS NULL AND n.held_reason IS NULL
       ORDER BY n.created_at FOR UPDATE OF n`,
      { ids: notificationIds },
      { transaction },
    );
    const result: SendAttempt = { sent: 0, held: 0, error: null };
    if (notices.length === 0) return result;
    const held = notices.map((n) => ({ n, reason: holdReason(n, now) }));
    const holding = held.filter((h) => h.reason !== null);
    if (holding.length > 0) {
      await sqlRows(
        `UPDATE alarm_notifications SET held_reason = r.reason, next_attempt_at = NULL
         FROM json_to_recordset(CAST(:rows AS json)) AS r(id uuid, reason text) WHERE alarm_notifications.id = r.id RETURNING alarm_notifications.id`,
        { rows: JSON.stringify(holding.map((h) => ({ id: h.n.id, reason: h.reason }))) },
        { transaction },
      );
      await insertAlarmEvents(
        holding.map(({ n, reason }) => ({
          alarmId: n.alarm_id,
          organisationId: n.organisation_id,
          event: { at: now.toISOString(), kind: "notice_held", cause: `notice to ${n.email} held back: ${HOLD_CAUSES[reason!]}`, episode: n.episode },
          actorLabel: "worker",
          details: { notification_id: n.id, email: n.email, reason },
        })),
        transaction,
      );
      result.held = holding.length;
    }
    const outgoing = held.filter((h) => h.reason === null).map((h) => h.n);
    if (outgoing.length === 0) return result;
    const alarms = await loadMailAlarms(outgoing.map((n) => n.alarm_id), transaction);
    const items = outgoing.map((n) => mailItem(alarms.get(n.alarm_id) as MailAlarmRow, n));
    // Most urgent first, as on the alarms page; active before cleared.
    items.sort(
      (a, b) =>
        Number(a.state !== "active") - Number(b.state !== "active") ||
        ALARM_PRIORITIES.indexOf(a.priority) - ALARM_PRIORITIES.indexOf(b.priority) ||
        a.activation.at.getTime() - b.activation.at.getTime(),
    );
    const first = alarms.get(outgoing[0].alarm_id) as MailAlarmRow;
    const display = (await effectiveDisplaySettingsOfUsers([outgoing[0].user_id], transaction)).get(outgoing[0].user_id) ?? DEFAULT_DISPLAY_SETTINGS;
    const mail = composeAlarmMail({
      siteName: first.site_name,
      timeZone: first.time_zone,
      recipientName: outgoing[0].recipient_name,
      items,
      alarmsUrl: `${appUrl()}/alarms`,
      ackTtlHours: ACK_LINK_TTL_HOURS,
      display,
    });
    let error: string | null = null;
    try {
      await sendMail({ to: outgoing[0].email, subject: mail.subject, text: mail.text, html: mail.html });
    } catch (err) {
      error = err instanceof Error ? err.message : String(err);
    }
    const nextAttemptAt = error === null ? null : new Date(now.getTime() + Math.exp(Math.min(attempt, 10)) * 1000);
    const mailId = randomUUID();
    await sqlRows(
      `UPDATE alarm_notifications SET attempts = attempts + 1, mail_id = :mailId, sent_at = CASE WHEN :failed THEN NULL ELSE CAST(:now AS timestamptz) END,
         send_error = :error, next_attempt_at = :nextAttemptAt
       WHERE id IN (:ids) RETURNING id`,
      { mailId, failed: error !== null, now, error, nextAttemptAt, ids: outgoing.map((n) => n.id) },
      { transaction },
    );
    const zone = outgoing[0].time_zone;
    await insertAlarmEvents(
      outgoing.map((n) => ({
        alarmId: n.alarm_id,
        organisationId: n.organisation_id,
        event: {
          at: now.toISOString(),
          kind: error === null ? "notified" : "notification_failed",
          cause:
            error === null
              ? `e-mailed ${n.email} (on-call position ${n.position}, ${n.reason === "escalation" ? "escalation" : "first notice"}, attempt ${n.attempts + 1})`
              : `e-mail to ${n.email} not delivered (attempt ${n.attempts + 1}): ${error}; next try ${formatDateTime(nextAttemptAt!, { locale: "en-GB", timeZone: zone })}`,
          episode: n.episode,
        },
        actorLabel: "worker",
        details: { recipient_user_id: n.user_id, email: n.email, position: n.position, reason: n.reason, mail_id: mailId, notification_id: n.id, attempt: n.attempts + 1 },
      })),
      transaction,
    );
    result.sent = error === null ? outgoing.length : 0;
    result.error = error;
    return result;
  });
}

// ── The acknowledge link ─────────────────────────────────────────────────────────────────────────

export type AckLinkProblem = "malformed" | "bad_signature" | "expired" | "unknown" | "used" | "stale" | "other_organisation" | "recipient_unable";

export function ackLinkProblemMessage(reason: AckLinkProblem): string {
  switch (reason) {
    case "expired":
      return "This acknowledge link has expired, and nothing was acknowledged. Sign in and acknowledge the alarm on the alarms page.";
    case "used":
      return "This acknowledge link was already used (or refused once), and nothing more was acknowledged. The alarm's history shows who acknowledged it.";
    case "stale":
      return "This acknowledge link was sent for an earlier activation of the alarm; the alarm has activated again since, so nothing was acknowledged. Use the link in the newest e-mail, or the alarms page.";
    case "other_organisation":
      return "This link belongs to another organisation than the one you are signed in to, so nothing was acknowledged. Sign out, or open the link where you are not signed in.";
    case "recipient_unable":
      return "The person this link was sent to can no longer acknowledge alarms, so nothing was acknowledged.";
    default:
      return "This acknowledge link is not valid, and nothing was acknowledged. Open the whole link from the alarm e-mail, or sign in and use the alarms page.";
  }
}

interface NotificationRow {
  id: string;
  organisation_id: string;
  alarm_id: string;
  episode: number;
  user_id: string;
  email: string;
  expires_at: Date;
  used_at: Date | null;
  user_name: string;
  user_role: Role;
  user_status: string;
  user_organisation_id: string;
  alarm_organisation_id: string;
  alarm_episode: number;
  refusal: string | null;
}

const ACK_LINK_PROBLEMS: readonly string[] = ["malformed", "bad_signature", "expired", "unknown", "used", "stale", "other_organisation", "recipient_unable"] satisfies AckLinkProblem[];
const isAckLinkProblem = (v: string | null): v is AckLinkProblem => v !== null && ACK_LINK_PROBLEMS.includes(v);

export type AckLinkLookup =
  | { ok: true; notificationId: string; alarmId: string; organisationId: string; recipient: { id: string; email: string; name: string }; expiresAt: Date }
  | { ok: false; reason: AckLinkProblem };

/** The link's notification row (when the signature names one) and what the link may do now. */
async function findNotification(token: string, viewerOrganisationId: string | null, now: Date, transaction?: Transaction): Promise<{ lookup: AckLinkLookup; rowId: string | null }> {
  const check = verifySignedToken(token, ACK_LINK_PURPOSE, now);
  if (!check.ok) return { lookup: check, rowId: null };
  const [row] = await sqlRows<NotificationRow>(
    `SELECT n.id, n.organisation_id, n.alarm_id, n.episode, n.user_id, n.email, n.expires_at, n.used_at, n.refusal,
            u.name AS user_name, u.role AS user_role, u.status AS user_status, u.organisation_id AS user_organisation_id,
            al.organisation_id AS alarm_organisation_id, al.episode AS alarm_episode
     FROM alarm_notifications n JOIN users u ON u.id = n.user_id JOIN alarms al ON al.id = n.alarm_id
     WHERE n.id = :id ${transaction ? "FOR UPDATE OF n" : ""}`,
    { id: check.id },
    { transaction },
  );
  const refuse = (reason: AckLinkProblem) => ({ lookup: { ok: false as const, reason }, rowId: row?.id ?? null });
  if (!row) return refuse("unknown");
  if (row.organisation_id !== row.alarm_organisation_id || row.organisation_id !== row.user_organisation_id) return refuse("other_organisation");
  if (viewerOrganisationId !== null && viewerOrganisationId !== row.organisation_id) return refuse("other_organisation");
  // A spent link says why it was first refused (a link refused as expired stays refused as expired).
  if (row.used_at) return { lookup: { ok: false, reason: isAckLinkProblem(row.refusal) ? row.refusal : "used" }, rowId: null };
  if (new Date(row.expires_at) <= now) return refuse("expired");
  if (row.alarm_episode !== row.episode) return refuse("stale");
  if (row.user_status !== "active" || !can(row.user_role, "alarm:acknowledge")) return refuse("recipient_unable");
  return {
    lookup: {
      ok: true,
      notificationId: row.id,
      alarmId: row.alarm_id,
      organisationId: row.organisation_id,
      recipient: { id: row.user_id, email: row.email, name: row.user_name || row.email },
      expiresAt: new Date(row.expires_at),
    },
    rowId: row.id,
  };
}

/**
 * What an acknowledge link stands for, without changing anything (the confirmation page; mail
 * scanners open links too). A viewer signed in to another organisation is refused like a foreign link.
 */
export async function lookUpAckLink(token: string, viewerOrganisationId: string | null, now = new Date()): Promise<AckLinkLookup> {
  return (await findNotification(token, viewerOrganisationId, now)).lookup;
}

export type AckByLinkResult =
  | { ok: true; alarmId: string; recipientEmail: string }
  | { ok: false; reason: AckLinkProblem }
  | { ok: false; reason: "not_acknowledgeable"; message: string };

/** A refused link is spent, whatever the reason: it cannot be tried again later (e.g. once the alarm re-activates). */
async function spendLink(id: string, refusal: string, now: Date, transaction: Transaction): Promise<void> {
  await sqlRows(`UPDATE alarm_notifications SET used_at = :now, refusal = :refusal WHERE id = :id AND used_at IS NULL RETURNING id`, { now, refusal, id }, { transaction });
}

/**
 * Acknowledges the alarm as the link's recipient, once: the notification row is locked, checked and
 * marked used in the transaction that acknowledges. The link works only for the activation (episode)
 * it was sent for. A refused link is spent too, and the alarm left as it is.
 */
export async function acknowledgeByLink(token: string, comment: string | null, viewerOrganisationId: string | null, now = new Date()): Promise<AckByLinkResult> {
  return getSequelize().transaction(async (transaction) => {
    const { lookup: found, rowId } = await findNotification(token, viewerOrganisationId, now, transaction);
    if (!found.ok) {
      if (rowId) await spendLink(rowId, found.reason, now, transaction);
      return found;
    }
    const [alarm] = await sqlRows<AlarmDbRow>(`SELECT * FROM alarms WHERE id = :id FOR UPDATE`, { id: found.alarmId }, { transaction });
    const applied = applyAlarmInput(toRecord(alarm), { type: "acknowledge" }, { at: now, cause: "acknowledged from the e-mail link" });
    if (!applied.ok) {
      await spendLink(found.notificationId, "not_acknowledgeable", now, transaction);
      return { ok: false, reason: "not_acknowledgeable", message: applied.message };
    }
    await saveAlarm(alarm.id, applied.result.record, { acknowledged: { at: now, userId: found.recipient.id } }, transaction);
    await insertAlarmEvents(
      applied.result.events.map((event) => ({
        alarmId: alarm.id,
        organisationId: alarm.organisation_id,
        event,
        userId: found.recipient.id,
        actorLabel: found.recipient.email,
        comment,
        details: { via: "email_link", notification_id: found.notificationId },
      })),
      transaction,
    );
    await sqlRows(`UPDATE alarm_notifications SET used_at = :now WHERE id = :id RETURNING id`, { now, id: found.notificationId }, { transaction });
    await writeAudit(
      { organisationId: alarm.organisation_id, userId: found.recipient.id, label: found.recipient.email },
      "alarm.acknowledge",
      { type: "alarm", id: alarm.id },
      { via: "email_link", notification_id: found.notificationId, ...(comment ? { comment } : {}) },
      transaction,
    );
    return { ok: true, alarmId: alarm.id, recipientEmail: found.recipient.email };
  });
}
