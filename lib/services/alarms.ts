// Alarms for the API and the screens: the list (server-paged, filtered, sorted, organisation-scoped),
// one alarm with its events and notifications, and the people's actions — acknowledge, shelve,
// unshelve, out of service, return to service, reset — each a transition of the engine, an alarm
// event and an audit row, in one transaction.

import type { Transaction } from "sequelize";
import { getSequelize } from "../db/sequelize";
import { writeAudit, type Actor } from "./audit";
import { AppError, notFound } from "../errors";
import { alarmKindLabel, applyAlarmInput } from "../alarms/engine";
import { isAwaitingReset, type AlarmActionErrorCode, type AlarmInput, type AlarmPriority, type AlarmState } from "../alarms/state-machine";
import { groupAlarms } from "../alarms/floods";
import type { AlarmListQuery, AlarmSort } from "../validations/alarm";
import { type AlarmDbRow, type AlarmRowExtras, insertAlarmEvents, saveAlarm, toRecord } from "./alarm-store";
import { sqlRows } from "../db/sql";
import { detailsFor, personLabel, siteScope, textFor, wholeOrganisation, type Scope } from "../db/site-scope";

interface AlarmViewRow extends AlarmDbRow {
  site_name: string;
  time_zone: string;
  asset_name: string | null;
  channel_index: number | null;
  device_name: string | null;
  ack_email: string | null;
  ack_name: string | null;
}

const VIEW_SELECT = `
  SELECT al.*, s.name AS site_name, s.time_zone, a.name AS asset_name, ch.index AS channel_index, d.name AS device_name,
         u.email AS ack_email, u.name AS ack_name
  FROM alarms al JOIN sites s ON s.id = al.site_id LEFT JOIN assets a ON a.id = al.asset_id
  LEFT JOIN channels ch ON ch.id = al.channel_id LEFT JOIN devices d ON d.id = al.device_id
  LEFT JOIN users u ON u.id = al.acknowledged_by`;

const iso = (d: Date | null) => (d === null ? null : new Date(d).toISOString());

export function serialiseAlarm(r: AlarmViewRow) {
  const record = toRecord(r);
  return {
    id: r.id,
    kind: r.kind,
    label: alarmKindLabel(r.kind),
    priority: r.priority,
    state: r.state,
    condition_active: r.condition_active,
    latching: r.latching,
    awaiting_reset: isAwaitingReset(record.snapshot),
    shelved_until: iso(r.shelved_until),
    shelve_reason: r.shelve_reason,
    out_of_service_reason: r.out_of_service_reason,
    site: { id: r.site_id, name: r.site_name, time_zone: r.time_zone },
    asset: r.asset_id ? { id: r.asset_id, name: r.asset_name } : null,
    channel: r.channel_id ? { id: r.channel_id, index: r.channel_index, device_id: r.device_id, device_name: r.device_name } : null,
    device: r.device_id ? { id: r.device_id, name: r.device_name } : null,
    cause_key: r.cause_key,
    members: r.members,
    value: r.value,
    setpoint: r.setpoint,
    unit: r.unit,
    activations: r.activations,
    episode: r.episode,
    activated_at: iso(r.activated_at),
    cleared_at: iso(r.cleared_at),
    acknowledged_at: iso(r.acknowledged_at),
    acknowledged_by: r.acknowledged_by ? { id: r.acknowledged_by, email: r.ack_email, name: r.ack_name } : null,
    last_change_at: iso(r.last_change_at),
    created_at: iso(r.created_at),
  };
}
export type AlarmJson = ReturnType<typeof serialiseAlarm>;

const PRIORITY_ORDER = `CASE al.priority WHEN 'critical' THEN 0 WHEN 'high' THEN 1 WHEN 'medium' THEN 2 ELSE 3 END`;
const STATE_ORDER = `CASE al.state WHEN 'unacknowledged' THEN 0 WHEN 'returned_unacknowledged' THEN 1 WHEN 'acknowledged' THEN 2
  WHEN 'shelved' THEN 3 WHEN 'suppressed_by_design' THEN 4 WHEN 'out_of_service' THEN 5 ELSE 6 END`;

const SORTS: Record<AlarmSort, string> = {
  priority: `${PRIORITY_ORDER}, al.activated_at DESC NULLS LAST`,
  "-priority": `${PRIORITY_ORDER} DESC, al.activated_at DESC NULLS LAST`,
  activated_at: "al.activated_at ASC NULLS LAST",
  "-activated_at": "al.activated_at DESC NULLS LAST",
  state: `${STATE_ORDER}, ${PRIORITY_ORDER}`,
  "-state": `${STATE_ORDER} DESC, ${PRIORITY_ORDER}`,
  site: "s.name ASC, a.name ASC NULLS FIRST",
  "-site": "s.name DESC, a.name DESC NULLS LAST",
  asset: "a.name ASC NULLS LAST, al.kind",
  "-asset": "a.name DESC NULLS LAST, al.kind",
  kind: "al.kind ASC, a.name ASC NULLS LAST",
  "-kind": "al.kind DESC, a.name ASC NULLS LAST",
};

/** One page of the organisation's alarms with the total that match. */
export async function listAlarms(scope: Scope, q: AlarmListQuery) {
  // Positional parameters, so that each shape of filter is one prepared statement per connection.
  const params: unknown[] = [scope.organisationId];
  const param = (value: unknown) => `$${params.push(value)}`;
  const where = ["al.organisation_id = $1", siteScope(scope, "al.site_id")];
  if (q.state?.length) {
    const states = q.state.filter((s) => s !== "active");
    const clauses = [];
    if (q.state.includes("active")) clauses.push("al.state <> 'normal'");
    if (states.length) clauses.push(`al.state = ANY(${param(states)})`);
    where.push(`(${clauses.join(" OR ")})`);
  }
  if (q.site_id) where.push(`al.site_id = ${param(q.site_id)}`);
  if (q.asset_id) where.push(`al.asset_id = ${param(q.asset_id)}`);
  if (q.device_id) where.push(`al.device_id = ${param(q.device_id)}`);
  if (q.include !== "suppressed" && !q.state?.includes("suppressed_by_design")) where.push("al.state <> 'suppressed_by_design'");
  if (q.priority?.length) where.push(`al.priority = ANY(${param(q.priority)})`);
  if (q.kind?.length) where.push(`al.kind = ANY(${param(q.kind)})`);
  if (q.from) where.push(`al.activated_at >= ${param(q.from)}`);
  if (q.to) where.push(`al.activated_at < ${param(q.to)}`);
  const filter = where.join(" AND ");
  const countSql = `SELECT count(*) AS n FROM alarms al JOIN sites s ON s.id = al.site_id LEFT JOIN assets a ON a.id = al.asset_id WHERE ${filter}`;
  // The page and the total in one statement; only a page past the end needs the count on its own.
  const items = await sqlRows<AlarmViewRow & { total: string }>(
    `${VIEW_SELECT.replace("SELECT al.*,", "SELECT count(*) OVER () AS total, al.*,")} WHERE ${filter}
     ORDER BY ${SORTS[q.sort]}, al.id LIMIT ${param(q.page_size)} OFFSET ${param((q.page - 1) * q.page_size)}`,
    params,
    { name: "alarm_list" },
  );
  const total = items.length ? Number(items[0].total) : Number((await sqlRows<{ n: string }>(countSql, params.slice(0, -2), { name: "alarm_count" }))[0].n);
  const page = { total, page: q.page, page_size: q.page_size, sort: q.sort, items: items.map(({ total: _total, ...r }) => serialiseAlarmFor(scope, r)) };
  if (!q.group) return page;
  const groupable = await sqlRows<{ id: string; site_id: string; device_id: string | null; state: AlarmState; priority: AlarmPriority; condition_active: boolean; cause_key: string | null }>(
    `SELECT al.id, al.site_id, al.device_id, al.state, al.priority, al.condition_active, al.cause_key
     FROM alarms al JOIN sites s ON s.id = al.site_id LEFT JOIN assets a ON a.id = al.asset_id WHERE ${filter}`,
    params.slice(0, -2),
  );
  const groups = groupAlarms(
    groupable.map((g) => ({ id: g.id, siteId: g.site_id, deviceId: g.device_id, state: g.state, priority: g.priority, conditionActive: g.condition_active, causeKey: g.cause_key })),
    q.group,
  );
  const names = await sqlRows<{ id: string; name: string }>(
    `SELECT id, name FROM devices WHERE organisation_id = :organisationId UNION ALL SELECT id, name FROM sites WHERE organisation_id = :organisationId
     UNION ALL SELECT ch.id, coalesce(a.name, d.name || ' channel ' || ch.index) FROM channels ch JOIN devices d ON d.id = ch.device_id LEFT JOIN assets a ON a.id = ch.asset_id
     WHERE d.organisation_id = :organisationId`,
    { organisationId: scope.organisationId },
  );
  const nameOf = new Map(names.map((n) => [n.id, n.name]));
  return { ...page, groups: groups.map((g) => ({ ...g, label: groupLabel(g.by, g.id, nameOf) })) };
}

/** A group's heading: the device or site by name, a cause in words (consequential.ts key formats). */
function groupLabel(by: string, id: string, nameOf: ReadonlyMap<string, string>): string {
  if (by !== "cause") return nameOf.get(id) ?? id;
  const [scope, scopeId, what] = id.split(":");
  const name = nameOf.get(scopeId) ?? scopeId;
  if (scope === "device" && what === "offline") return `${name} offline`;
  if (scope === "channel") return `${what.replaceAll("_", " ")} fault on ${name}`;
  return `${what.replaceAll("_", " ")} on several channels of ${name}`;
}

async function findAlarmRow(scope: Scope, id: string, transaction?: Transaction): Promise<AlarmViewRow> {
  const [row] = await sqlRows<AlarmViewRow>(
    `${VIEW_SELECT} WHERE al.id = :id AND al.organisation_id = :organisationId AND ${siteScope(scope, "al.site_id")} ${transaction ? "FOR UPDATE OF al" : ""}`,
    { id, organisationId: scope.organisationId },
    { transaction },
  );
  if (!row) throw notFound("That alarm");
  return row;
}

/** The alarm as this reader may see it: who acknowledged it by name only for a viewer. */
function serialiseAlarmFor(scope: Scope, r: AlarmViewRow): AlarmJson {
  const alarm = serialiseAlarm(r);
  if (scope.staffEmails || !alarm.acknowledged_by) return alarm;
  return { ...alarm, acknowledged_by: { ...alarm.acknowledged_by, email: null } };
}

export async function findAlarm(scope: Scope, id: string): Promise<AlarmJson> {
  return serialiseAlarmFor(scope, await findAlarmRow(scope, id));
}

interface EventRow {
  id: string;
  at: Date;
  kind: string;
  from_state: string | null;
  to_state: string | null;
  cause: string;
  value: number | null;
  setpoint: number | null;
  priority: string | null;
  episode: number | null;
  user_id: string | null;
  actor_label: string | null;
  actor_name: string | null;
  comment: string | null;
  details: Record<string, unknown>;
}

interface NotificationRow {
  id: string;
  episode: number;
  email: string | null;
  recipient_name: string;
  position: number;
  reason: string;
  attempts: number;
  sent_at: Date | null;
  send_error: string | null;
  /** When a failed send is tried again (graphile-worker's backoff). */
  next_attempt_at: Date | null;
  /** Why the e-mail was not sent after all. */
  held_reason: string | null;
  expires_at: Date;
  used_at: Date | null;
}

/** One alarm with its events (newest first) and the notifications about it with their delivery state. */
export async function findAlarmWithHistory(scope: Scope, id: string, eventLimit = 200) {
  const alarm = await findAlarm(scope, id);
  const [events, notifications] = await Promise.all([
    sqlRows<EventRow>(
      `SELECT e.id, e.at, e.kind, e.from_state, e.to_state, e.cause, e.value, e.setpoint, e.priority, e.episode, e.user_id, e.actor_label,
              u.name AS actor_name, e.comment, e.details
       FROM alarm_events e LEFT JOIN users u ON u.id = e.user_id WHERE e.alarm_id = :id ORDER BY e.at DESC, e.id DESC LIMIT :limit`,
      { id, limit: eventLimit },
    ),
    sqlRows<NotificationRow>(
      `SELECT n.id, n.episode, n.email, coalesce(nullif(u.name, ''), n.email) AS recipient_name, n.position, n.reason, n.attempts, n.sent_at, n.send_error,
              n.next_attempt_at, n.held_reason, n.expires_at, n.used_at
       FROM alarm_notifications n JOIN users u ON u.id = n.user_id WHERE n.alarm_id = :id ORDER BY n.created_at DESC LIMIT 100`,
      { id },
    ),
  ]);
  return {
    ...alarm,
    events: events.map(({ actor_name, ...e }) => ({ ...e, actor_label: personLabel(scope, e.actor_label, actor_name), cause: textFor(scope, e.cause), details: detailsFor(scope, e.details), id: Number(e.id), at: new Date(e.at).toISOString() })),
    // Who was e-mailed is staff business: a viewer sees that a notification went out, not to whom.
    notifications: notifications.map((n) => ({
      ...n,
      email: scope.staffEmails ? n.email : null,
      sent_at: iso(n.sent_at),
      next_attempt_at: iso(n.next_attempt_at),
      expires_at: iso(n.expires_at),
      used_at: iso(n.used_at),
    })),
  };
}

export type AlarmAction =
  | { type: "acknowledge"; comment?: string }
  | { type: "shelve"; until: Date; reason: string; comment?: string }
  | { type: "unshelve"; comment?: string }
  | { type: "remove_from_service"; reason: string; comment?: string }
  | { type: "return_to_service"; comment?: string }
  | { type: "reset"; comment?: string };

const ACTION_AUDIT: Record<AlarmAction["type"], string> = {
  acknowledge: "alarm.acknowledge",
  shelve: "alarm.shelve",
  unshelve: "alarm.unshelve",
  remove_from_service: "alarm.out_of_service",
  return_to_service: "alarm.return_to_service",
  reset: "alarm.reset",
};

function actionInput(action: AlarmAction, now: Date): AlarmInput {
  if (action.type === "shelve") return { type: "shelve", at: now, until: action.until };
  return { type: action.type };
}

function actionCause(action: AlarmAction): string {
  switch (action.type) {
    case "acknowledge":
      return "acknowledged";
    case "shelve":
      return `shelved until ${action.until.toISOString()}: ${action.reason}`;
    case "unshelve":
      return "unshelved";
    case "remove_from_service":
      return `taken out of service: ${action.reason}`;
    case "return_to_service":
      return "returned to service";
    case "reset":
      return "reset after it cleared";
  }
}

function actionExtras(action: AlarmAction, actor: Actor, now: Date): AlarmRowExtras {
  switch (action.type) {
    case "acknowledge":
      return { acknowledged: { at: now, userId: actor.userId } };
    case "shelve":
      return { shelveReason: action.reason };
    case "unshelve":
      return { shelveReason: null };
    case "remove_from_service":
      return { outOfServiceReason: action.reason, shelveReason: null };
    case "return_to_service":
      return { outOfServiceReason: null };
    case "reset":
      return {};
  }
}

/** A refused action as an application error: a bad shelve expiry is the request's fault, the rest conflict with the alarm's state. */
export function alarmRefusal(code: AlarmActionErrorCode, message: string): AppError {
  return new AppError(code === "invalid_shelve_expiry" ? "invalid" : "conflict", message, { code });
}

async function actInTransaction(actor: Actor, id: string, action: AlarmAction, now: Date, transaction: Transaction): Promise<AlarmJson> {
  const row = await findAlarmRow(wholeOrganisation(actor.organisationId), id, transaction);
  const applied = applyAlarmInput(toRecord(row), actionInput(action, now), { at: now, cause: actionCause(action) });
  if (!applied.ok) throw alarmRefusal(applied.code, applied.message);
  await saveAlarm(id, applied.result.record, actionExtras(action, actor, now), transaction);
  await insertAlarmEvents(
    applied.result.events.map((event) => ({
      alarmId: id,
      organisationId: actor.organisationId,
      event,
      userId: actor.userId,
      actorLabel: actor.label,
      comment: action.comment ?? null,
      details: "reason" in action ? { reason: action.reason } : {},
    })),
    transaction,
  );
  const details: Record<string, unknown> = { from: row.state, to: applied.result.record.snapshot.state };
  if (action.comment) details.comment = action.comment;
  if (action.type === "shelve") Object.assign(details, { until: action.until.toISOString(), reason: action.reason });
  if (action.type === "remove_from_service") details.reason = action.reason;
  await writeAudit(actor, ACTION_AUDIT[action.type], { type: "alarm", id }, details, transaction);
  return serialiseAlarm(await findAlarmRow(wholeOrganisation(actor.organisationId), id, transaction));
}

/** Applies a person's action; a refused one is a 409 (or 422 for a bad shelve expiry) with the reducer's message. */
export async function actOnAlarm(actor: Actor, id: string, action: AlarmAction, now = new Date()): Promise<AlarmJson> {
  return getSequelize().transaction((transaction) => actInTransaction(actor, id, action, now, transaction));
}

/** Acknowledges each alarm on its own: one that cannot be acknowledged is reported and the others go ahead. */
export async function acknowledgeAlarms(actor: Actor, ids: readonly string[], comment?: string, now = new Date()) {
  const acknowledged: AlarmJson[] = [];
  const refused: { id: string; error: string; message: string }[] = [];
  for (const id of [...new Set(ids)]) {
    try {
      acknowledged.push(await actOnAlarm(actor, id, { type: "acknowledge", comment }, now));
    } catch (err) {
      if (!(err instanceof AppError)) throw err;
      refused.push({ id, error: err.code, message: err.message });
    }
  }
  return { acknowledged, refused };
}
