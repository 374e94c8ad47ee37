// The database side of the worker's alarm stage: loads the alarms a batch concerns with their stored
// condition state, runs the engine, writes back state and events. Set-based: a handful of statements
// per batch, never one per measurement. Idempotent: each alarm remembers how far it evaluated, so a
// batch seen twice, or a sweep that overlaps the last one, changes nothing.

import type { Transaction } from "sequelize";
import {
  DEFAULT_PRIORITIES,
  RATE_ALARM_SETTINGS,
  type AlarmRecord,
  type EngineEvent,
  type RateAlarmState,
  evaluateLevelAlarm,
  evaluateRateAlarm,
  healthFlagChanges,
  applyConditionChanges,
  isLevelAlarmKind,
  shelveExpiry,
} from "../alarms/engine";
import type { LevelSample, SetpointKey, SetpointState } from "../alarms/setpoints";
import { keepUnseenOccurrenceAsHistory } from "../alarms/late-history";
import type { AlarmPriority } from "../alarms/state-machine";
import type { HealthFlagKind } from "../health/flags";
import { type AlarmDbRow, type EventToWrite, insertAlarmEvents, toRecord } from "../services/alarm-store";
import { sqlRows, sqlRun } from "../db/sql";

/** A usable level of a tank from one measurement. */
export interface AssetLevelSample {
  assetId: string;
  channelId: string;
  at: Date;
  levelM: number;
}

export interface StageCounts {
  alarmsEvaluated: number;
  events: number;
}

interface SetpointDbRow {
  asset_id: string;
  key: SetpointKey;
  value_m: number;
  deadband_m: number;
  on_delay_s: number;
  priority: AlarmPriority;
  enabled: boolean;
  latching: boolean;
}

interface SettingsDbRow {
  asset_id: string;
  organisation_id: string;
  roc_limit_m_per_h: number | null;
  roc_priority: AlarmPriority;
  roc_enabled: boolean;
}

export interface StageUpdate {
  row: AlarmDbRow;
  record: AlarmRecord;
  events: EngineEvent[];
  evalState: unknown;
  evaluatedUntil: Date | null;
  /** Forget how far the alarm was evaluated (a released flag alarm is judged again from its open flag). */
  resetEvaluatedUntil?: boolean;
  /** The cause that suppresses it, null to clear; left as stored when undefined. */
  causeKey?: string | null;
}

/** Creates the missing alarm rows of the tanks' setpoints and rate-of-change limits (in normal). */
export async function ensureLevelAlarmRows(assetIds: readonly string[], transaction: Transaction): Promise<void> {
  if (assetIds.length === 0) return;
  await sqlRows(
    `WITH measuring AS (SELECT DISTINCT ON (asset_id) asset_id, device_id FROM channels WHERE asset_id = ANY($1::uuid[]) ORDER BY asset_id, index)
     INSERT INTO alarms (organisation_id, site_id, asset_id, device_id, kind, priority, latching, unit)
     SELECT a.organisation_id, a.site_id, sp.asset_id, m.device_id, sp.key, sp.priority, sp.latching, 'm'
     FROM alarm_setpoints sp JOIN assets a ON a.id = sp.asset_id LEFT JOIN measuring m ON m.asset_id = a.id WHERE sp.asset_id = ANY($1::uuid[])
     UNION ALL
     SELECT a.organisation_id, a.site_id, s.asset_id, m.device_id, 'rate_of_change', s.roc_priority, false, 'm/h'
     FROM asset_alarm_settings s JOIN assets a ON a.id = s.asset_id LEFT JOIN measuring m ON m.asset_id = a.id
     WHERE s.asset_id = ANY($1::uuid[]) AND s.roc_limit_m_per_h IS NOT NULL
     ON CONFLICT (asset_id, kind) WHERE channel_id IS NULL DO NOTHING
     RETURNING id`,
    [assetIds],
    { transaction },
  );
}

/** Writes the stage's changes: one UPDATE for all alarms, one INSERT for all events. */
export async function saveStageUpdates(updates: readonly StageUpdate[], transaction: Transaction): Promise<number> {
  if (updates.length === 0) return 0;
  const u = updates;
  await sqlRun(
    `UPDATE alarms al SET state = v.state, condition_active = v.condition_active, shelved_until = v.shelved_until,
       episode = v.episode, activations = v.activations, activated_at = v.activated_at, cleared_at = v.cleared_at,
       value = v.value, setpoint = v.setpoint, last_change_at = v.last_change_at,
       eval_state = COALESCE(v.eval_state, al.eval_state),
       evaluated_until = CASE WHEN v.reset_until THEN NULL ELSE COALESCE(v.evaluated_until, al.evaluated_until) END,
       cause_key = CASE WHEN v.set_cause THEN v.cause_key ELSE al.cause_key END,
       acknowledged_at = CASE WHEN v.new_episode THEN NULL ELSE al.acknowledged_at END,
       acknowledged_by = CASE WHEN v.new_episode THEN NULL ELSE al.acknowledged_by END,
       shelve_reason = CASE WHEN v.state = 'shelved' THEN al.shelve_reason ELSE NULL END,
       updated_at = now()
     FROM unnest($1::uuid[], $2::text[], $3::boolean[], $4::timestamptz[], $5::int[], $6::int[], $7::timestamptz[], $8::timestamptz[],
                 $9::float8[], $10::float8[], $11::timestamptz[], $12::jsonb[], $13::timestamptz[], $14::boolean[],
                 $15::boolean[], $16::boolean[], $17::text[])
       AS v(id, state, condition_active, shelved_until, episode, activations, activated_at, cleared_at, value, setpoint, last_change_at, eval_state, evaluated_until, new_episode,
            reset_until, set_cause, cause_key)
     WHERE al.id = v.id`,
    [
      u.map((x) => x.row.id),
      u.map((x) => x.record.snapshot.state),
      u.map((x) => x.record.snapshot.conditionActive),
      u.map((x) => x.record.snapshot.shelvedUntil),
      u.map((x) => x.record.episode),
      u.map((x) => x.record.activations),
      u.map((x) => x.record.activatedAt),
      u.map((x) => x.record.clearedAt),
      u.map((x) => x.record.value),
      u.map((x) => x.record.setpoint),
      u.map((x) => x.record.lastChangeAt),
      u.map((x) => (x.evalState === undefined ? null : JSON.stringify(x.evalState))),
      u.map((x) => x.evaluatedUntil),
      u.map((x) => x.record.episode > x.row.episode),
      u.map((x) => x.resetEvaluatedUntil ?? false),
      u.map((x) => x.causeKey !== undefined),
      u.map((x) => x.causeKey ?? null),
    ],
    { transaction },
  );
  const events: EventToWrite[] = u.flatMap((x) =>
    x.events.map((event) => ({ alarmId: x.row.id, organisationId: x.row.organisation_id, event, actorLabel: "worker" })),
  );
  await insertAlarmEvents(events, transaction);
  return events.length;
}

function groupBy<T>(items: readonly T[], key: (t: T) => string): Map<string, T[]> {
  const out = new Map<string, T[]>();
  for (const item of items) {
    const k = key(item);
    const list = out.get(k);
    if (list) list.push(item);
    else out.set(k, [item]);
  }
  return out;
}

/**
 * Evaluates the level setpoints and rate-of-change limits of the tanks in a batch, inside the batch's
 * transaction. Tanks without alarm settings are skipped; their rows are locked in asset order, so two
 * workers with batches of one tank take turns.
 */
export async function evaluateLevelAlarms(samples: readonly AssetLevelSample[], now: Date, transaction: Transaction): Promise<StageCounts> {
  const byAsset = groupBy(samples, (s) => s.assetId);
  const assetIds = [...byAsset.keys()].sort();
  if (assetIds.length === 0) return { alarmsEvaluated: 0, events: 0 };
  const settings = await sqlRows<SettingsDbRow>(
    `SELECT asset_id, organisation_id, roc_limit_m_per_h, roc_priority, roc_enabled FROM asset_alarm_settings
     WHERE asset_id = ANY($1::uuid[]) ORDER BY asset_id FOR UPDATE`,
    [assetIds],
    { transaction },
  );
  if (settings.length === 0) return { alarmsEvaluated: 0, events: 0 };
  const ids = settings.map((s) => s.asset_id);
  await ensureLevelAlarmRows(ids, transaction);
  const setpoints = await sqlRows<SetpointDbRow>(`SELECT * FROM alarm_setpoints WHERE asset_id = ANY($1::uuid[])`, [ids], { transaction });
  const alarms = await sqlRows<AlarmDbRow>(`SELECT * FROM alarms WHERE asset_id = ANY($1::uuid[]) AND channel_id IS NULL ORDER BY id FOR UPDATE`, [ids], { transaction });
  const setpointOf = new Map(setpoints.map((s) => [`${s.asset_id}:${s.key}`, s]));
  const settingsOf = new Map(settings.map((s) => [s.asset_id, s]));
  const history = await rateHistory(settings, byAsset, transaction);

  const updates: StageUpdate[] = [];
  for (const row of alarms) {
    const assetSamples = (byAsset.get(row.asset_id as string) ?? []).map((s): LevelSample => ({ at: s.at, value: s.levelM }));
    if (isLevelAlarmKind(row.kind)) {
      const sp = setpointOf.get(`${row.asset_id}:${row.kind}`);
      if (!sp) continue;
      const def = { key: sp.key, value: sp.value_m, deadband: sp.deadband_m, onDelayS: sp.on_delay_s, priority: sp.priority, enabled: sp.enabled };
      const stored = isSetpointState(row.eval_state) ? row.eval_state : null;
      const r = evaluateLevelAlarm(def, toRecord(row), stored, assetSamples);
      if (r.samplesUsed === 0 && r.events.length === 0) continue;
      const kept = keepUnseenOccurrenceAsHistory(r, now);
      updates.push({ row, record: kept.record, events: kept.events, evalState: r.state, evaluatedUntil: r.state.lastAtMs === null ? null : new Date(r.state.lastAtMs) });
    } else if (row.kind === "rate_of_change") {
      const s = settingsOf.get(row.asset_id as string);
      if (!s || s.roc_limit_m_per_h === null) continue;
      const stored = isRateState(row.eval_state) ? row.eval_state : null;
      const r = evaluateRateAlarm({ limitMPerH: s.roc_limit_m_per_h, enabled: s.roc_enabled }, toRecord(row), stored, history.get(row.asset_id as string) ?? [], assetSamples);
      if (r.state.lastEvalAtMs === stored?.lastEvalAtMs && r.events.length === 0) continue;
      const kept = keepUnseenOccurrenceAsHistory(r, now);
      updates.push({ row, record: kept.record, events: kept.events, evalState: r.state, evaluatedUntil: r.state.lastEvalAtMs === null ? null : new Date(r.state.lastEvalAtMs) });
    }
  }
  const last = new Map(assetIds.map((id) => [id, new Date(Math.max(...(byAsset.get(id) ?? []).map((s) => s.at.getTime())))]));
  await sqlRows(
    `UPDATE asset_alarm_settings s SET evaluated_until = greatest(s.evaluated_until, v.at)
     FROM unnest($1::uuid[], $2::timestamptz[]) AS v(asset_id, at) WHERE s.asset_id = v.asset_id`,
    [ids, ids.map((id) => last.get(id) ?? null)],
    { transaction },
  );
  return { alarmsEvaluated: updates.length, events: await saveStageUpdates(updates, transaction) };
}

function isSetpointState(v: unknown): v is SetpointState {
  return typeof v === "object" && v !== null && "active" in v && "lastAtMs" in v && "pendingSinceMs" in v;
}

function isRateState(v: unknown): v is RateAlarmState {
  return typeof v === "object" && v !== null && "lastEvalAtMs" in v && "active" in v;
}

/** The trailing window of stored levels before each rate-watched tank's first new sample. */
async function rateHistory(settings: readonly SettingsDbRow[], byAsset: ReadonlyMap<string, AssetLevelSample[]>, transaction: Transaction): Promise<Map<string, LevelSample[]>> {
  const out = new Map<string, LevelSample[]>();
  const watched = settings.filter((s) => s.roc_enabled && s.roc_limit_m_per_h !== null);
  if (watched.length === 0) return out;
  const firsts = watched.map((s) => Math.min(...(byAsset.get(s.asset_id) ?? []).map((x) => x.at.getTime())));
  const found = await sqlRows<{ asset_id: string; at: Date; level_m: number }>(
    `SELECT v.asset_id, m.at, m.level_m
     FROM unnest($1::uuid[], $2::timestamptz[]) AS v(asset_id, first_at)
     JOIN channels ch ON ch.asset_id = v.asset_id
     JOIN measurements m ON m.channel_id = ch.id AND m.at >= v.first_at - make_interval(secs => $3) AND m.at < v.first_at
     WHERE m.status IN ('ok', 'noisy') AND m.level_m IS NOT NULL
     ORDER BY m.at`,
    [watched.map((s) => s.asset_id), firsts.map((ms) => new Date(ms)), RATE_ALARM_SETTINGS.windowS],
    { transaction },
  );
  for (const r of found) {
    const list = out.get(r.asset_id) ?? [];
    list.push({ at: r.at, value: r.level_m });
    out.set(r.asset_id, list);
  }
  return out;
}

interface FlagDbRow {
  id: string;
  channel_id: string;
  flag: HealthFlagKind;
  since: Date;
  cleared_at: Date | null;
  magnitude: number | null;
  updated_at: Date;
}

/** Applies health-flag rows to their channels' alarms (creating the alarms the first time a flag shows). */
async function applyFlagRows(flags: readonly FlagDbRow[], extraAlarmIds: readonly string[], now: Date, transaction: Transaction): Promise<StageCounts> {
  const keys = [...new Map(flags.map((f) => [`${f.channel_id}:${f.flag}`, f])).values()];
  if (keys.length) {
    await sqlRows(
      `INSERT INTO alarms (organisation_id, site_id, asset_id, channel_id, device_id, kind, priority)
       SELECT d.organisation_id, d.site_id, ch.asset_id, v.channel_id, d.id, v.flag, v.priority
       FROM unnest($1::uuid[], $2::text[], $3::text[]) AS v(channel_id, flag, priority)
       JOIN channels ch ON ch.id = v.channel_id JOIN devices d ON d.id = ch.device_id
       ON CONFLICT (channel_id, kind) WHERE channel_id IS NOT NULL DO NOTHING
       RETURNING id`,
      [keys.map((k) => k.channel_id), keys.map((k) => k.flag), keys.map((k) => DEFAULT_PRIORITIES[k.flag])],
      { transaction },
    );
  }
  const alarms = await sqlRows<AlarmDbRow>(
    `SELECT al.* FROM alarms al
     WHERE al.channel_id IS NOT NULL
       AND ((al.channel_id, al.kind) IN (SELECT * FROM unnest($1::uuid[], $2::text[])) OR al.id = ANY($3::uuid[]))
     ORDER BY al.id FOR UPDATE OF al`,
    [keys.map((k) => k.channel_id), keys.map((k) => k.flag), extraAlarmIds],
    { transaction },
  );
  const flagsOf = groupBy(flags, (f) => `${f.channel_id}:${f.flag}`);
  const updates: StageUpdate[] = [];
  for (const row of alarms) {
    const intervals = (flagsOf.get(`${row.channel_id}:${row.kind}`) ?? []).map((f) => ({ since: f.since, clearedAt: f.cleared_at, magnitude: f.magnitude }));
    const untilMs = row.evaluated_until === null ? null : new Date(row.evaluated_until).getTime();
    const changes = healthFlagChanges(row.kind as HealthFlagKind, intervals, untilMs, row.condition_active);
    if (changes.length === 0) continue;
    const r = keepUnseenOccurrenceAsHistory(applyConditionChanges(toRecord(row), changes), now);
    const latest = Math.max(untilMs ?? -Infinity, ...changes.map((c) => new Date(c.at).getTime()));
    updates.push({ row, record: r.record, events: r.events, evalState: undefined, evaluatedUntil: new Date(latest) });
  }
  return { alarmsEvaluated: updates.length, events: await saveStageUpdates(updates, transaction) };
}

/** Health flags a batch wrote (inside its transaction, where now() is the transaction's start). */
export async function evaluateHealthAlarmsForChannels(channelIds: readonly string[], now: Date, transaction: Transaction): Promise<StageCounts> {
  if (channelIds.length === 0) return { alarmsEvaluated: 0, events: 0 };
  const flags = await sqlRows<FlagDbRow>(
    `SELECT id, channel_id, flag, since, cleared_at, magnitude, updated_at FROM health_flags
     WHERE channel_id = ANY($1::uuid[]) AND (cleared_at IS NULL OR updated_at >= now())`,
    [channelIds],
    { transaction },
  );
  return applyFlagRows(flags, [], now, transaction);
}

const HEALTH_CURSOR = "health_flags";
// Rows are read again this far behind the cursor: a flag written by a transaction that committed late
// is still seen, and the alarms' own evaluated_until makes the overlap harmless.
const CURSOR_OVERLAP_MS = 10 * 60_000;

/**
 * Every health flag changed since the last sweep, every open flag, and the latest flag of every alarm
 * whose condition is still active: offline flags are raised between batches, so this runs on the
 * worker's cycle as well as after batches.
 */
export async function sweepHealthAlarms(now: Date, transaction: Transaction): Promise<StageCounts> {
  await sqlRows(`INSERT INTO alarm_stage_cursors (name, at) VALUES ($1, '-infinity') ON CONFLICT (name) DO NOTHING RETURNING name`, [HEALTH_CURSOR], { transaction });
  const [cursor] = await sqlRows<{ at: Date | string }>(`SELECT at FROM alarm_stage_cursors WHERE name = $1 FOR UPDATE`, [HEALTH_CURSOR], { transaction });
  const active = await sqlRows<{ id: string; channel_id: string; kind: HealthFlagKind }>(
    `SELECT id, channel_id, kind FROM alarms WHERE channel_id IS NOT NULL AND condition_active`,
    [],
    { transaction },
  );
  const flags = await sqlRows<FlagDbRow>(
    `SELECT id, channel_id, flag, since, cleared_at, magnitude, updated_at FROM health_flags
     WHERE cleared_at IS NULL OR updated_at > $1::timestamptz
     UNION
     SELECT * FROM (
       SELECT DISTINCT ON (f.channel_id, f.flag) f.id, f.channel_id, f.flag, f.since, f.cleared_at, f.magnitude, f.updated_at
       FROM health_flags f JOIN unnest($2::uuid[], $3::text[]) AS v(channel_id, flag) ON f.channel_id = v.channel_id AND f.flag = v.flag
       ORDER BY f.channel_id, f.flag, f.since DESC
     ) latest`,
    [cursor.at, active.map((a) => a.channel_id), active.map((a) => a.kind)],
    { transaction },
  );
  const counts = await applyFlagRows(flags, active.map((a) => a.id), now, transaction);
  const newest = flags.reduce((max, f) => Math.max(max, new Date(f.updated_at).getTime()), -Infinity);
  if (Number.isFinite(newest)) {
    await sqlRows(`UPDATE alarm_stage_cursors SET at = greatest(at, $2::timestamptz) WHERE name = $1 RETURNING name`, [HEALTH_CURSOR, new Date(newest - CURSOR_OVERLAP_MS)], { transaction });
  }
  return counts;
}

/** Shelved alarms whose expiry has passed return by themselves. */
export async function expireShelves(now: Date, transaction: Transaction): Promise<StageCounts> {
  const due = await sqlRows<AlarmDbRow>(
    `SELECT * FROM alarms WHERE state = 'shelved' AND shelved_until <= :now ORDER BY id FOR UPDATE SKIP LOCKED`,
    { now },
    { transaction },
  );
  const updates: StageUpdate[] = [];
  for (const row of due) {
    const r = shelveExpiry(toRecord(row), now);
    if (r) updates.push({ row, record: r.record, events: r.events, evalState: undefined, evaluatedUntil: null });
  }
  return { alarmsEvaluated: updates.length, events: await saveStageUpdates(updates, transaction) };
}
