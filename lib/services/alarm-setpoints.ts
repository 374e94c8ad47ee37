// A tank's alarm definitions: HH/H/L/LL setpoints (stored in metres of level, entered in metres or
// fill %) with deadband, on-delay, priority, enabled and latching, and the rate-of-change limit.
// Saving replaces the whole set; an alarm whose setpoint goes away or is disabled clears at once,
// with an event, so nothing is left active that nothing evaluates any more.

import { wholeOrganisation, type Scope } from "../db/site-scope";
import type { Transaction } from "sequelize";
import { getSequelize } from "../db/sequelize";
import { writeAudit, type Actor } from "./audit";
import { AppError } from "../errors";
import { tankCapacity, tankHeight, volumeAtLevel, type TankGeometry } from "../geometry/tank-volume";
import { DEFAULT_PRIORITIES, applyAlarmInput, type AlarmRecord, type EngineEvent } from "../alarms/engine";
import { LEVEL_ON_DELAY_S, SETPOINT_KEYS, initialSetpointState, levelDeadbandM, type SetpointKey } from "../alarms/setpoints";
import { isAwaitingReset, type AlarmInput, type AlarmPriority } from "../alarms/state-machine";
import { setpointIssues, setpointToLevelM, type PutSetpointsInput } from "../validations/setpoint";
import { findAsset } from "./assets";
import { type AlarmDbRow, insertAlarmEvents, saveAlarm, toRecord } from "./alarm-store";
import { ensureLevelAlarmRows } from "../worker/alarm-evaluation";
import { sqlRows } from "../db/sql";

interface SetpointRow {
  key: SetpointKey;
  value_m: number;
  entered_unit: "m" | "pct";
  entered_value: number;
  deadband_m: number;
  on_delay_s: number;
  priority: AlarmPriority;
  enabled: boolean;
  latching: boolean;
}

interface SettingsRow {
  roc_limit_m_per_h: number | null;
  roc_priority: AlarmPriority;
  roc_enabled: boolean;
}

async function tankOf(scope: Scope, assetId: string): Promise<{ id: string; name: string; geometry: TankGeometry }> {
  const asset = await findAsset(scope, assetId);
  if (asset.kind !== "tank" || !asset.geometry) {
    throw new AppError("invalid", "Level setpoints belong to tanks; this asset is not a tank with a geometry.", { code: "not_a_tank" });
  }
  return { id: asset.id, name: asset.name, geometry: asset.geometry };
}

function describe(tank: { id: string; name: string; geometry: TankGeometry }, setpoints: readonly SetpointRow[], settings: SettingsRow | null) {
  const height = tankHeight(tank.geometry);
  const capacity = tankCapacity(tank.geometry);
  const byKey = new Map(setpoints.map((s) => [s.key, s]));
  const out = Object.fromEntries(
    SETPOINT_KEYS.map((key) => {
      const s = byKey.get(key);
      return [
        key,
        s
          ? {
              value_m: s.value_m,
              fill_pct: capacity > 0 ? (100 * volumeAtLevel(tank.geometry, s.value_m)) / capacity : null,
              entered_unit: s.entered_unit,
              entered_value: s.entered_value,
              deadband_m: s.deadband_m,
              on_delay_s: s.on_delay_s,
              priority: s.priority,
              enabled: s.enabled,
              latching: s.latching,
            }
          : null,
      ];
    }),
  );
  return {
    asset_id: tank.id,
    asset_name: tank.name,
    tank_height_m: height,
    capacity_l: capacity,
    setpoints: out,
    rate_of_change:
      settings && settings.roc_limit_m_per_h !== null
        ? { limit_m_per_h: settings.roc_limit_m_per_h, priority: settings.roc_priority, enabled: settings.roc_enabled }
        : null,
    defaults: {
      deadband_m: levelDeadbandM(height),
      on_delay_s: LEVEL_ON_DELAY_S,
      priorities: { hh: DEFAULT_PRIORITIES.hh, h: DEFAULT_PRIORITIES.h, l: DEFAULT_PRIORITIES.l, ll: DEFAULT_PRIORITIES.ll, rate_of_change: DEFAULT_PRIORITIES.rate_of_change },
    },
  };
}
export type SetpointsJson = ReturnType<typeof describe>;

async function load(assetId: string, transaction?: Transaction) {
  const [setpoints, [settings]] = await Promise.all([
    sqlRows<SetpointRow>(`SELECT * FROM alarm_setpoints WHERE asset_id = :assetId`, { assetId }, { transaction }),
    sqlRows<SettingsRow>(`SELECT roc_limit_m_per_h, roc_priority, roc_enabled FROM asset_alarm_settings WHERE asset_id = :assetId`, { assetId }, { transaction }),
  ]);
  return { setpoints, settings: settings ?? null };
}

export async function getSetpoints(scope: Scope, assetId: string): Promise<SetpointsJson> {
  const tank = await tankOf(scope, assetId);
  const { setpoints, settings } = await load(assetId);
  return describe(tank, setpoints, settings);
}

/** Applies inputs in turn, keeping the events; an input the state refuses is skipped. */
function applyAll(record: AlarmRecord, inputs: readonly { input: AlarmInput; cause: string }[], now: Date): { record: AlarmRecord; events: EngineEvent[] } {
  let current = record;
  const events: EngineEvent[] = [];
  for (const { input, cause } of inputs) {
    const r = applyAlarmInput(current, input, { at: now, cause });
    if (!r.ok) continue;
    current = r.result.record;
    events.push(...r.result.events);
  }
  return { record: current, events };
}

/** Replaces the tank's setpoints and rate-of-change limit; answers 422 with a message per field. */
export async function putSetpoints(actor: Actor, assetId: string, input: PutSetpointsInput, now = new Date()): Promise<SetpointsJson> {
  const tank = await tankOf(wholeOrganisation(actor.organisationId), assetId);
  const issues = setpointIssues(input, tank.geometry);
  if (issues.length) {
    throw new AppError("invalid", issues.map((i) => `${i.path}: ${i.message}`).join("; "), { fields: Object.fromEntries(issues.map((i) => [i.path, i.message])) });
  }
  const height = tankHeight(tank.geometry);
  return getSequelize().transaction(async (transaction) => {
    const rate = input.rate_of_change ?? null;
    await sqlRows(
      `INSERT INTO asset_alarm_settings (asset_id, organisation_id, roc_limit_m_per_h, roc_priority, roc_enabled)
       VALUES (:assetId, :organisationId, :limit, :priority, :enabled)
       ON CONFLICT (asset_id) DO UPDATE SET roc_limit_m_per_h = excluded.roc_limit_m_per_h, roc_priority = excluded.roc_priority,
         roc_enabled = excluded.roc_enabled, updated_at = now()
       RETURNING asset_id`,
      {
        assetId,
        organisationId: actor.organisationId,
        limit: rate?.limit_m_per_h ?? null,
        priority: rate?.priority ?? DEFAULT_PRIORITIES.rate_of_change,
        enabled: rate ? (rate.enabled ?? true) : false,
      },
      { transaction },
    );
    const before = await load(assetId, transaction);
    const kept: SetpointKey[] = [];
    for (const key of SETPOINT_KEYS) {
      const sp = input.setpoints[key];
      if (!sp) continue;
      kept.push(key);
      await sqlRows(
        `INSERT INTO alarm_setpoints (asset_id, key, value_m, entered_unit, entered_value, deadband_m, on_delay_s, priority, enabled, latching)
         VALUES (:assetId, :key, :valueM, :unit, :value, :deadband, :onDelay, :priority, :enabled, :latching)
         ON CONFLICT (asset_id, key) DO UPDATE SET value_m = excluded.value_m, entered_unit = excluded.entered_unit, entered_value = excluded.entered_value,
           deadband_m = excluded.deadband_m, on_delay_s = excluded.on_delay_s, priority = excluded.priority, enabled = excluded.enabled,
           latching = excluded.latching, updated_at = now()
         RETURNING key`,
        {
          assetId,
          key,
          valueM: setpointToLevelM(sp.value, input.unit, tank.geometry),
          unit: input.unit,
          value: sp.value,
          deadband: sp.deadband_m ?? levelDeadbandM(height),
          onDelay: sp.on_delay_s ?? LEVEL_ON_DELAY_S,
          priority: sp.priority ?? DEFAULT_PRIORITIES[key],
          enabled: sp.enabled ?? true,
          latching: sp.latching ?? false,
        },
        { transaction },
      );
    }
    await sqlRows(
      `DELETE FROM alarm_setpoints WHERE asset_id = :assetId ${kept.length ? "AND key NOT IN (:kept)" : ""} RETURNING key`,
      { assetId, kept },
      { transaction },
    );
    await ensureLevelAlarmRows([assetId], transaction);
    const after = await load(assetId, transaction);
    await syncAlarms(actor, assetId, after.setpoints, after.settings, now, transaction);
    await writeAudit(actor, "setpoints.update", { type: "asset", id: assetId }, { before: describe(tank, before.setpoints, before.settings), after: input }, transaction);
    return describe(tank, after.setpoints, after.settings);
  });
}

/** Brings the asset's level alarms in line with its definitions: priority, latching, and clearing what is no longer watched. */
async function syncAlarms(actor: Actor, assetId: string, setpoints: readonly SetpointRow[], settings: SettingsRow | null, now: Date, transaction: Transaction) {
  const alarms = await sqlRows<AlarmDbRow>(`SELECT * FROM alarms WHERE asset_id = :assetId AND channel_id IS NULL ORDER BY id FOR UPDATE`, { assetId }, { transaction });
  const byKey = new Map(setpoints.map((s) => [s.key, s]));
  for (const row of alarms) {
    const def =
      row.kind === "rate_of_change"
        ? settings && settings.roc_limit_m_per_h !== null
          ? { priority: settings.roc_priority, latching: false, watched: settings.roc_enabled, label: "rate-of-change limit" }
          : null
        : (() => {
            const s = byKey.get(row.kind as SetpointKey);
            return s ? { priority: s.priority, latching: s.latching, watched: s.enabled, label: `${row.kind.toUpperCase()} setpoint` } : null;
          })();
    const record = toRecord(row);
    const inputs: { input: AlarmInput; cause: string }[] = [];
    const watched = def?.watched ?? false;
    if (!watched && record.snapshot.conditionActive) {
      inputs.push({ input: { type: "condition_cleared" }, cause: def ? `${def.label} disabled` : `${row.kind === "rate_of_change" ? "rate-of-change limit" : `${row.kind.toUpperCase()} setpoint`} removed` });
    }
    if (def && !def.latching && row.latching) inputs.push({ input: { type: "reset" }, cause: "latching turned off" });
    const applied = applyAll(record, inputs, now);
    const events = applied.events;
    let next = applied.record;
    // A latched alarm that has not been reset stays latched until it is; only then does the flag go.
    const latching = def ? def.latching || isAwaitingReset(next.snapshot) : next.snapshot.latching && isAwaitingReset(next.snapshot);
    next = { ...next, snapshot: { ...next.snapshot, latching }, priority: def?.priority ?? next.priority };
    const evalReset = !watched ? { evalState: row.kind === "rate_of_change" ? { lastEvalAtMs: null, active: false } : initialSetpointState() } : {};
    await saveAlarm(row.id, next, evalReset, transaction);
    await insertAlarmEvents(
      events.map((event) => ({ alarmId: row.id, organisationId: row.organisation_id, event, userId: actor.userId, actorLabel: actor.label })),
      transaction,
    );
  }
}
