// The notify stage's database side and the e-mail acknowledge link. The stage plans with
// lib/alarms/engine-notify.ts, stores one notification row per alarm episode and recipient (the
// unique key keeps it to one e-mail each, even with two workers), sends, and records every notice
// as an alarm event. A link names its notification, is signed and expires; the row makes it
// single-use and binds it to the recipient, whose acknowledgement it records.

import { randomUUID } from "node:crypto";
import type { Transaction } from "sequelize";
import { getSequelize } from "../db/sequelize";
import { writeAudit } from "./audit";
import { can, type Role } from "../auth/permissions";
import { createSignedToken, verifySignedToken } from "../auth/invite-token";
import { alarmKindLabel, applyAlarmInput, type AlarmKind } from "../alarms/engine";
import { groupIntoMails, planNotifications, type OnCallPerson, type PlannedNotice, NOTIFY_MAX_AGE_HOURS } from "../alarms/engine-notify";
import { ALARM_PRIORITIES, type AlarmPriority } from "../alarms/state-machine";
import { composeAlarmMail, type AlarmMailItem } from "../mail/alarm-mail";
import { appUrl, sendMail } from "../mail/send-mail";
import { type AlarmDbRow, insertAlarmEvents, saveAlarm, toRecord } from "./alarm-store";
import { sqlRows } from "../db/sql";

export const ACK_LINK_PURPOSE = "alarm-ack";
/** How long an acknowledge link works (Halftrip's choice: a day covers a night shift and the morning after). */
export const ACK_LINK_TTL_HOURS = 24;
/** A notice whose e-mail failed is tried this many times in all. */
const MAX_SEND_ATTEMPTS = 3;

interface CandidateRow {
  id: string;
  site_id: string;
  episode: number;
  state: AlarmDbRow["state"];
  activated_at: Date | null;
}

interface OnCallRow {
  site_id: string;
  position: number;
  user_id: string;
  email: string;
  name: string;
  role: Role;
  status: string;
  user_organisation_id: string;
  site_organisation_id: string;
}

interface MailAlarmRow {
  id: string;
  organisation_id: string;
  kind: AlarmKind;
  priority: AlarmPriority;
  value: number | null;
  setpoint: number | null;
  unit: string | null;
  activated_at: Date | null;
  asset_id: string | null;
  asset_name: string | null;
  channel_index: number | null;
  device_name: string | null;
  site_name: string;
  time_zone: string;
}

export interface NotifyResult {
  mails: number;
  notices: number;
  failed: number;
}

function ackUrl(notificationId: string, expiresAt: Date): string {
  return `${appUrl()}/ack/${encodeURIComponent(createSignedToken(notificationId, expiresAt, ACK_LINK_PURPOSE))}`;
}

interface OutgoingNotice extends PlannedNotice {
  notificationId: string;
  expiresAt: Date;
}

/** Composes and sends one e-mail; returns the error text when it failed. */
async function deliver(notices: readonly OutgoingNotice[], recipientName: string, transaction: Transaction): Promise<string | null> {
  const alarms = await sqlRows<MailAlarmRow>(
    `SELECT al.id, al.organisation_id, al.kind, al.priority, al.value, al.setpoint, al.unit, al.activated_at, al.asset_id,
            a.name AS asset_name, ch.index AS channel_index, d.name AS device_name, s.name AS site_name, s.time_zone
     FROM alarms al JOIN sites s ON s.id = al.site_id LEFT JOIN assets a ON a.id = al.asset_id
     LEFT JOIN channels ch ON ch.id = al.channel_id LEFT JOIN devices d ON d.id = ch.device_id
     WHERE al.id IN (:ids)`,
    { ids: notices.map((n) => n.alarmId) },
    { transaction },
  );
  const byId = new Map(alarms.map((a) => [a.id, a]));
  const items: AlarmMailItem[] = notices.map((n) => {
    const a = byId.get(n.alarmId) as MailAlarmRow;
    return {
      condition: alarmKindLabel(a.kind),
      priority: a.priority,
      assetName: a.asset_name,
      channelLabel: a.device_name !== null ? `${a.device_name}, channel ${a.channel_index}` : null,
      value: a.value,
      setpoint: a.setpoint,
      unit: a.unit,
      at: a.activated_at ?? new Date(),
      assetUrl: a.asset_id ? `${appUrl()}/assets/${a.asset_id}` : null,
      ackUrl: ackUrl(n.notificationId, n.expiresAt),
      escalation: n.reason === "escalation",
    };
  });
  // Most urgent first, as on the alarms page.
  items.sort((a, b) => ALARM_PRIORITIES.indexOf(a.priority) - ALARM_PRIORITIES.indexOf(b.priority) || a.at.getTime() - b.at.getTime());
  const first = byId.get(notices[0].alarmId) as MailAlarmRow;
  const mail = composeAlarmMail({
    siteName: first.site_name,
    timeZone: first.time_zone,
    recipientName,
    items,
    alarmsUrl: `${appUrl()}/alarms`,
    ackTtlHours: ACK_LINK_TTL_HOURS,
  });
  try {
    await sendMail({ to: notices[0].email, subject: mail.subject, text: mail.text, html: mail.html });
    return null;
  } catch (err) {
    return err instanceof Error ? err.message : String(err);
  }
}

/** Marks the notices sent (or failed) and records each as an event of its alarm. */
async function recordDelivery(notices: readonly OutgoingNotice[], organisationId: string, mailId: string, error: string | null, transaction: Transaction) {
  await sqlRows(
    `UPDATE alarm_notifications SET attempts = attempts + 1, mail_id = :mailId,
       sent_at = CASE WHEN :failed THEN NULL ELSE now() END, send_error = :error
     WHERE id IN (:ids) RETURNING id`,
    { mailId, failed: error !== null, error, ids: notices.map((n) => n.notificationId) },
    { transaction },
  );
  await insertAlarmEvents(
    notices.map((n) => ({
      alarmId: n.alarmId,
      organisationId,
      event: {
        at: new Date().toISOString(),
        kind: error === null ? "notified" : "notification_failed",
        cause:
          error === null
            ? `e-mailed ${n.email} (on-call position ${n.position}, ${n.reason === "escalation" ? "escalation" : "first notice"})`
            : `e-mail to ${n.email} failed: ${error}`,
        episode: n.episode,
      },
      actorLabel: "worker",
      details: { recipient_user_id: n.userId, email: n.email, position: n.position, reason: n.reason, mail_id: mailId, notification_id: n.notificationId },
    })),
    transaction,
  );
}

/**
 * The notify stage: due first notices and escalations go out, one e-mail per recipient and site;
 * notices whose e-mail failed are tried again. Each e-mail is claimed, sent and recorded in one
 * transaction, so a crash before the commit leaves it to be sent again rather than lost.
 */
export async function runNotifications(now: Date = new Date()): Promise<NotifyResult> {
  const result: NotifyResult = { mails: 0, notices: 0, failed: 0 };
  const candidates = await sqlRows<CandidateRow>(
    `SELECT id, site_id, episode, state, activated_at FROM alarms
     WHERE state IN ('unacknowledged', 'returned_unacknowledged') AND episode > 0
       AND activated_at >= CAST(:now AS timestamptz) - make_interval(hours => :maxAge)`,
    { now, maxAge: NOTIFY_MAX_AGE_HOURS },
  );
  if (candidates.length > 0) {
    const siteIds = [...new Set(candidates.map((c) => c.site_id))];
    const [onCallRows, siteRows, sentRows] = await Promise.all([
      sqlRows<OnCallRow>(
        `SELECT oc.site_id, oc.position, u.id AS user_id, u.email, u.name, u.role, u.status, u.organisation_id AS user_organisation_id,
                s.organisation_id AS site_organisation_id
         FROM on_call_entries oc JOIN users u ON u.id = oc.user_id JOIN sites s ON s.id = oc.site_id
         WHERE oc.site_id IN (:siteIds) ORDER BY oc.site_id, oc.position`,
        { siteIds },
      ),
      sqlRows<{ id: string; escalation_delay_min: number }>(`SELECT id, escalation_delay_min FROM sites WHERE id IN (:siteIds)`, { siteIds }),
      sqlRows<{ alarm_id: string; episode: number; user_id: string; sent_at: Date | null }>(
        `SELECT alarm_id, episode, user_id, sent_at FROM alarm_notifications WHERE alarm_id IN (:ids)`,
        { ids: candidates.map((c) => c.id) },
      ),
    ]);
    const onCall = new Map<string, OnCallPerson[]>();
    const names = new Map<string, string>();
    for (const r of onCallRows) {
      const eligible = r.status === "active" && can(r.role, "alarm:acknowledge") && r.user_organisation_id === r.site_organisation_id;
      onCall.set(r.site_id, [...(onCall.get(r.site_id) ?? []), { userId: r.user_id, email: r.email, position: r.position, eligible }]);
      names.set(r.user_id, r.name || r.email);
    }
    const planned = planNotifications({
      alarms: candidates.map((c) => ({ alarmId: c.id, siteId: c.site_id, episode: c.episode, state: c.state, activatedAt: c.activated_at })),
      onCall,
      escalationDelayMin: new Map(siteRows.map((s) => [s.id, s.escalation_delay_min])),
      sent: sentRows.map((s) => ({ alarmId: s.alarm_id, episode: s.episode, userId: s.user_id, sentAt: s.sent_at })),
      now,
    });
    for (const mail of groupIntoMails(planned)) {
      const sent = await sendPlannedMail(mail.notices, names.get(mail.userId) ?? mail.email, now);
      if (sent) {
        result.mails += 1;
        result.notices += sent.notices;
        if (sent.failed) result.failed += 1;
      }
    }
  }
  const retried = await retryFailed();
  result.mails += retried.mails;
  result.notices += retried.notices;
  result.failed += retried.failed;
  return result;
}

async function sendPlannedMail(notices: readonly PlannedNotice[], recipientName: string, now: Date): Promise<{ notices: number; failed: boolean } | null> {
  return getSequelize().transaction(async (transaction) => {
    const expiresAt = new Date(now.getTime() + ACK_LINK_TTL_HOURS * 3_600_000);
    const outgoing: OutgoingNotice[] = [];
    let organisationId = "";
    for (const n of notices) {
      const notificationId = randomUUID();
      // Another worker may have claimed the same notice a moment ago: the unique key settles it.
      const claimed = await sqlRows<{ id: string; organisation_id: string }>(
        `INSERT INTO alarm_notifications (id, organisation_id, alarm_id, episode, user_id, email, position, reason, expires_at)
         SELECT :notificationId, al.organisation_id, al.id, :episode, :userId, :email, :position, :reason, :expiresAt FROM alarms al WHERE al.id = :alarmId
         ON CONFLICT (alarm_id, episode, user_id) DO NOTHING
         RETURNING id, organisation_id`,
        { notificationId, episode: n.episode, userId: n.userId, email: n.email, position: n.position, reason: n.reason, expiresAt, alarmId: n.alarmId },
        { transaction },
      );
      if (claimed.length === 0) continue;
      organisationId = claimed[0].organisation_id;
      outgoing.push({ ...n, notificationId, expiresAt });
    }
    if (outgoing.length === 0) return null;
    const mailId = randomUUID();
    const error = await deliver(outgoing, recipientName, transaction);
    await recordDelivery(outgoing, organisationId, mailId, error, transaction);
    return { notices: outgoing.length, failed: error !== null };
  });
}

interface UnsentRow {
  id: string;
  organisation_id: string;
  alarm_id: string;
  episode: number;
  user_id: string;
  email: string;
  position: number;
  reason: "activation" | "escalation";
  expires_at: Date;
  site_id: string;
  name: string;
}

/** Notices whose e-mail failed, still needing an acknowledgement, sent again (grouped as before). */
async function retryFailed(): Promise<NotifyResult> {
  const result: NotifyResult = { mails: 0, notices: 0, failed: 0 };
  await getSequelize().transaction(async (transaction) => {
    const unsent = await sqlRows<UnsentRow>(
      `SELECT n.id, n.organisation_id, n.alarm_id, n.episode, n.user_id, n.email, n.position, n.reason, n.expires_at, al.site_id, u.name
       FROM alarm_notifications n JOIN alarms al ON al.id = n.alarm_id AND al.episode = n.episode JOIN users u ON u.id = n.user_id
       WHERE n.sent_at IS NULL AND n.attempts > 0 AND n.attempts < :max AND n.expires_at > now()
         AND al.state IN ('unacknowledged', 'returned_unacknowledged')
       ORDER BY n.created_at FOR UPDATE OF n SKIP LOCKED`,
      { max: MAX_SEND_ATTEMPTS },
      { transaction },
    );
    const groups = new Map<string, UnsentRow[]>();
    for (const r of unsent) groups.set(`${r.user_id}:${r.site_id}`, [...(groups.get(`${r.user_id}:${r.site_id}`) ?? []), r]);
    for (const group of groups.values()) {
      const outgoing: OutgoingNotice[] = group.map((r) => ({
        alarmId: r.alarm_id,
        siteId: r.site_id,
        episode: r.episode,
        userId: r.user_id,
        email: r.email,
        position: r.position,
        reason: r.reason,
        notificationId: r.id,
        expiresAt: r.expires_at,
      }));
      const error = await deliver(outgoing, group[0].name || group[0].email, transaction);
      await recordDelivery(outgoing, group[0].organisation_id, randomUUID(), error, transaction);
      result.mails += 1;
      result.notices += outgoing.length;
      if (error) result.failed += 1;
    }
  });
  return result;
}

// ── The acknowledge link ─────────────────────────────────────────────────────────────────────────

export type AckLinkProblem = "malformed" | "bad_signature" | "expired" | "unknown" | "used" | "other_organisation" | "recipient_unable";

export function ackLinkProblemMessage(reason: AckLinkProblem): string {
  switch (reason) {
    case "expired":
      return "This acknowledge link has expired, and nothing was acknowledged. Sign in and acknowledge the alarm on the alarms page.";
    case "used":
      return "This acknowledge link was already used, and nothing more was acknowledged. The alarm's history shows who acknowledged it.";
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
}

export type AckLinkLookup =
  | { ok: true; notificationId: string; alarmId: string; organisationId: string; recipient: { id: string; email: string; name: string }; expiresAt: Date }
  | { ok: false; reason: AckLinkProblem };

async function findNotification(token: string, viewerOrganisationId: string | null, now: Date, transaction?: Transaction): Promise<AckLinkLookup & { row?: NotificationRow }> {
  const check = verifySignedToken(token, ACK_LINK_PURPOSE, now);
  if (!check.ok) return check;
  const [row] = await sqlRows<NotificationRow>(
    `SELECT n.id, n.organisation_id, n.alarm_id, n.episode, n.user_id, n.email, n.expires_at, n.used_at,
            u.name AS user_name, u.role AS user_role, u.status AS user_status, u.organisation_id AS user_organisation_id,
            al.organisation_id AS alarm_organisation_id
     FROM alarm_notifications n JOIN users u ON u.id = n.user_id JOIN alarms al ON al.id = n.alarm_id
     WHERE n.id = :id ${transaction ? "FOR UPDATE OF n" : ""}`,
    { id: check.id },
    { transaction },
  );
  if (!row) return { ok: false, reason: "unknown" };
  if (row.organisation_id !== row.alarm_organisation_id || row.organisation_id !== row.user_organisation_id) return { ok: false, reason: "other_organisation" };
  if (viewerOrganisationId !== null && viewerOrganisationId !== row.organisation_id) return { ok: false, reason: "other_organisation" };
  if (row.used_at) return { ok: false, reason: "used" };
  if (new Date(row.expires_at) <= now) return { ok: false, reason: "expired" };
  if (row.user_status !== "active" || !can(row.user_role, "alarm:acknowledge")) return { ok: false, reason: "recipient_unable" };
  return {
    ok: true,
    notificationId: row.id,
    alarmId: row.alarm_id,
    organisationId: row.organisation_id,
    recipient: { id: row.user_id, email: row.email, name: row.user_name || row.email },
    expiresAt: new Date(row.expires_at),
    row,
  };
}

/**
 * What an acknowledge link stands for, without changing anything (the confirmation page). A viewer
 * signed in to another organisation is refused like a foreign link.
 */
export async function lookUpAckLink(token: string, viewerOrganisationId: string | null, now = new Date()): Promise<AckLinkLookup> {
  const found = await findNotification(token, viewerOrganisationId, now);
  if (!found.ok) return found;
  const { row: _row, ...lookup } = found;
  return lookup;
}

export type AckByLinkResult =
  | { ok: true; alarmId: string; recipientEmail: string }
  | { ok: false; reason: AckLinkProblem }
  | { ok: false; reason: "not_acknowledgeable"; message: string };

/**
 * Acknowledges the alarm as the link's recipient, once: the notification row is locked, checked and
 * marked used in the transaction that acknowledges. An alarm no longer waiting for an acknowledgement
 * leaves the link unused and the alarm as it is.
 */
export async function acknowledgeByLink(token: string, comment: string | null, viewerOrganisationId: string | null, now = new Date()): Promise<AckByLinkResult> {
  return getSequelize().transaction(async (transaction) => {
    const found = await findNotification(token, viewerOrganisationId, now, transaction);
    if (!found.ok) return found;
    const [alarm] = await sqlRows<AlarmDbRow>(`SELECT * FROM alarms WHERE id = :id FOR UPDATE`, { id: found.alarmId }, { transaction });
    const applied = applyAlarmInput(toRecord(alarm), { type: "acknowledge" }, { at: now, cause: "acknowledged from the e-mail link" });
    if (!applied.ok) return { ok: false, reason: "not_acknowledgeable", message: applied.message };
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
