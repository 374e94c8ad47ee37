// Reading and writing alarm rows and their events: the one place that maps the alarms table to the
// engine's AlarmRecord and back, shared by the worker's stages and the API's actions.

import type { Transaction } from "sequelize";
import type { AlarmKind, AlarmRecord, EngineEvent } from "../alarms/engine";
import type { AlarmPriority, AlarmState } from "../alarms/state-machine";
import { sqlRun } from "../db/sql";

/** A row of `alarms` as the database returns it. */
export interface AlarmDbRow {
  id: string;
  organisation_id: string;
  site_id: string;
  asset_id: string | null;
  channel_id: string | null;
  /** The device behind a channel alarm, or a device alarm's own device. */
  device_id: string | null;
  /** The cause that suppresses it (or, for a common cause, its own key). */
  cause_key: string | null;
  /** A common cause's members (consequential.ts CommonCauseMember). */
  members: unknown[];
  kind: AlarmKind;
  priority: AlarmPriority;
  latching: boolean;
  state: AlarmState;
  condition_active: boolean;
  shelved_until: Date | null;
  shelve_reason: string | null;
  out_of_service_reason: string | null;
  episode: number;
  activations: number;
  activated_at: Date | null;
  cleared_at: Date | null;
  acknowledged_at: Date | null;
  acknowledged_by: string | null;
  value: number | null;
  setpoint: number | null;
  unit: string | null;
  eval_state: Record<string, unknown>;
  evaluated_until: Date | null;
  last_change_at: Date | null;
  created_at: Date;
  updated_at: Date;
}

const iso = (d: Date | null): string | null => (d === null ? null : new Date(d).toISOString());

export function toRecord(r: AlarmDbRow): AlarmRecord {
  return {
    snapshot: { state: r.state, conditionActive: r.condition_active, latching: r.latching, shelvedUntil: iso(r.shelved_until) },
    priority: r.priority,
    episode: r.episode,
    activations: r.activations,
    activatedAt: iso(r.activated_at),
    clearedAt: iso(r.cleared_at),
    value: r.value,
    setpoint: r.setpoint,
    lastChangeAt: iso(r.last_change_at),
  };
}

export interface AlarmRowExtras {
  evalState?: unknown;
  evaluatedUntil?: Date | null;
  /** Set with an acknowledgement; cleared when a new episode begins. */
  acknowledged?: { at: Date; userId: string | null } | null;
  shelveReason?: string | null;
  outOfServiceReason?: string | null;
}

/** Writes the record's fields back to its row, with the extras that are given. */
export async function saveAlarm(id: string, record: AlarmRecord, extras: AlarmRowExtras, transaction: Transaction): Promise<void> {
  const sets = [
    "state = :state",
    "condition_active = :conditionActive",
    "latching = :latching",
    "shelved_until = :shelvedUntil",
    "priority = :priority",
    "episode = :episode",
    "activations = :activations",
    "activated_at = :activatedAt",
    "cleared_at = :clearedAt",
    "value = :value",
    "setpoint = :setpoint",
    "last_change_at = :lastChangeAt",
    "updated_at = now()",
  ];
  const replacements: Record<string, unknown> = {
    id,
    state: record.snapshot.state,
    conditionActive: record.snapshot.conditionActive,
    latching: record.snapshot.latching,
    shelvedUntil: record.snapshot.shelvedUntil,
    priority: record.priority,
    episode: record.episode,
    activations: record.activations,
    activatedAt: record.activatedAt,
    clearedAt: record.clearedAt,
    value: record.value,
    setpoint: record.setpoint,
    lastChangeAt: record.lastChangeAt,
  };
  if (extras.evalState !== undefined) {
    sets.push("eval_state = CAST(:evalState AS jsonb)");
    replacements.evalState = JSON.stringify(extras.evalState);
  }
  if (extras.evaluatedUntil !== undefined) {
    sets.push("evaluated_until = :evaluatedUntil");
    replacements.evaluatedUntil = extras.evaluatedUntil;
  }
  if (extras.acknowledged !== undefined) {
    sets.push("acknowledged_at = :ackAt", "acknowledged_by = :ackBy");
    replacements.ackAt = extras.acknowledged?.at ?? null;
    replacements.ackBy = extras.acknowledged?.userId ?? null;
  }
  if (extras.shelveReason !== undefined) {
    sets.push("shelve_reason = :shelveReason");
    replacements.shelveReason = extras.shelveReason;
  }
  if (extras.outOfServiceReason !== undefined) {
    sets.push("out_of_service_reason = :oosReason");
    replacements.oosReason = extras.outOfServiceReason;
  }
  await sqlRun(`UPDATE alarms SET ${sets.join(", ")} WHERE id = :id`, replacements, { transaction });
}

/** Besides the state changes, every notification is an event of its alarm. */
export type StoredEventKind = EngineEvent["kind"] | "notified" | "notification_failed" | "notice_held";

export interface EventToWrite {
  alarmId: string;
  organisationId: string;
  event: Pick<EngineEvent, "at" | "cause"> & Partial<Omit<EngineEvent, "kind">> & { kind: StoredEventKind };
  userId?: string | null;
  actorLabel?: string | null;
  comment?: string | null;
  details?: Record<string, unknown>;
}

/** Inserts events in one statement, in the order given. */
export async function insertAlarmEvents(events: readonly EventToWrite[], transaction: Transaction): Promise<void> {
  if (events.length === 0) return;
  const e = events;
  await sqlRun(
    `INSERT INTO alarm_events (alarm_id, organisation_id, at, kind, from_state, to_state, cause, value, setpoint, priority, episode, user_id, actor_label, comment, details)
     SELECT * FROM unnest($1::uuid[], $2::uuid[], $3::timestamptz[], $4::text[], $5::text[], $6::text[], $7::text[], $8::float8[], $9::float8[], $10::text[],
                          $11::int[], $12::uuid[], $13::text[], $14::text[], $15::jsonb[])`,
    [
      e.map((x) => x.alarmId),
      e.map((x) => x.organisationId),
      e.map((x) => x.event.at),
      e.map((x) => x.event.kind),
      e.map((x) => x.event.fromState ?? null),
      e.map((x) => x.event.toState ?? null),
      e.map((x) => x.event.cause),
      e.map((x) => x.event.value ?? null),
      e.map((x) => x.event.setpoint ?? null),
      e.map((x) => x.event.priority ?? null),
      e.map((x) => x.event.episode ?? null),
      e.map((x) => x.userId ?? null),
      e.map((x) => x.actorLabel ?? null),
      e.map((x) => x.comment ?? null),
      e.map((x) => JSON.stringify(x.details ?? {})),
    ],
    { transaction },
  );
}
