// CSV exports as streams of row batches: each batch is one keyset-paged query (a cursor that survives
// between pulls without holding a connection), so a year of measurements never sits in memory.
// Times are ISO 8601 in the site's own zone with its offset (the instant is exact, the clock is the
// site's), beside a column naming that zone. Figures are in the unit system asked for (the person's by
// default, SI with units=si); each column's name says its unit (level_m or level_ft), and rows keep the
// SI names internally.

import { personLabel, siteScope, textFor, type Scope } from "../db/site-scope";
import { AppError } from "../errors";
import type { CsvValue } from "../csv/write";
import type { ExportRange } from "../validations/export";
import { refillPlan } from "../read-models/refill-plan";
import { formatIsoWithOffset } from "../format/time";
import { roundMeasurement, roundToDecimals, roundUncertainty } from "../format/precision";
import { COVERAGE_FACTOR } from "../uncertainty/budget";
import type { ExportUnits } from "../format/export-units";
import { sqlRows } from "../db/sql";
import { UNIT_SYMBOLS } from "../units/units";

export const EXPORT_BATCH_ROWS = 5000;

type Batches = AsyncGenerator<CsvValue[][]>;

export const MEASUREMENT_COLUMNS = [
  "site",
  "asset",
  "asset_id",
  "device",
  "channel",
  "at",
  "site_time_zone",
  "status",
  "tof_us",
  "air_temp_c",
  "temp_source",
  "speed_of_sound_ms",
  "raw_distance_m",
  "distance_m",
  "level_m",
  "volume_l",
  "fill_pct",
  "ullage_l",
  "occupied",
  "uncertainty_m",
] as const;

/** The header of a measurement export in a unit system: level_ft, volume_gal, air_temp_f… */
export function measurementColumns(units: ExportUnits): string[] {
  return MEASUREMENT_COLUMNS.map(units.column);
}

interface ExportAsset {
  id: string;
  name: string;
  site_name: string;
  site_time_zone: string;
}

/** The chosen assets of the organisation, in the order given; an unknown id is 404 before anything streams. */
export async function exportAssets(scope: Scope, assetIds: readonly string[]): Promise<ExportAsset[]> {
  const rows = await sqlRows<ExportAsset>(
    `SELECT a.id, a.name, s.name AS site_name, s.time_zone AS site_time_zone FROM assets a JOIN sites s ON s.id = a.site_id
      WHERE a.organisation_id = $1 AND ${siteScope(scope, "a.site_id")} AND a.id = ANY($2::uuid[])`,
    [scope.organisationId, assetIds],
  );
  const byId = new Map(rows.map((r) => [r.id, r]));
  const missing = assetIds.filter((id) => !byId.has(id));
  if (missing.length) throw new AppError("not_found", `${missing.length === 1 ? "An asset" : `${missing.length} assets`} of the export was not found.`);
  return assetIds.map((id) => byId.get(id)!);
}

interface MeasurementRow {
  reading_id: string;
  at: Date;
  device_name: string;
  channel_index: number;
  status: string;
  tof_us: number | null;
  air_temp_c: number | null;
  temp_source: string | null;
  speed_of_sound_ms: number | null;
  raw_distance_m: number | null;
  distance_m: number | null;
  level_m: number | null;
  volume_l: number | null;
  fill_pct: number | null;
  ullage_l: number | null;
  occupied: boolean | null;
  uncertainty_m: number | null;
}

/** Lengths, volumes and the air temperature in the export's units (the speed of sound stays in m/s), as computed. */
function inUnits(m: MeasurementRow, units: ExportUnits): MeasurementRow {
  return {
    ...m,
    raw_distance_m: units.length(m.raw_distance_m),
    distance_m: units.length(m.distance_m),
    level_m: units.length(m.level_m),
    air_temp_c: units.celsius(m.air_temp_c),
    volume_l: units.litres(m.volume_l),
    ullage_l: units.litres(m.ullage_l),
    uncertainty_m: units.fine(m.uncertainty_m),
  };
}

const roundOrNull = (x: number | null, decimals: number) => (x === null ? null : roundToDecimals(x, decimals));

/** Four significant figures, never finer than 1 L or 0.1 US gal (as the screens write a volume without its uncertainty). */
function roundVolume(v: number | null, units: ExportUnits): number | null {
  if (v === null) return null;
  const magnitude = v === 0 ? 0 : Math.floor(Math.log10(Math.abs(v)));
  return roundToDecimals(v, Math.min(units.volume === "L" ? 0 : 1, 3 - magnitude));
}

/**
 * A measurement with no digit its uncertainty does not support: the uncertainty is converted to the
 * export's units first, then lengths go to the decimal place of U = 2u (GUM §7.2.6), the standard
 * uncertainty itself to two significant digits, the speed of sound to 0.01 m/s and the air temperature
 * to 0.1 degree (finer than their own doubt: common practice), volumes as on the screens.
 */
function toMeasuredPrecision(si: MeasurementRow, units: ExportUnits): MeasurementRow {
  const m = inUnits(si, units);
  const uLevel = units.length(si.uncertainty_m);
  const length = (x: number | null) => (x === null || uLevel === null || !(uLevel > 0) ? x : roundMeasurement(x, COVERAGE_FACTOR * uLevel).value);
  const u = m.uncertainty_m;
  return {
    ...m,
    raw_distance_m: length(m.raw_distance_m),
    distance_m: length(m.distance_m),
    level_m: length(m.level_m),
    speed_of_sound_ms: roundOrNull(m.speed_of_sound_ms, 2),
    air_temp_c: roundOrNull(m.air_temp_c, 1),
    volume_l: roundVolume(m.volume_l, units),
    ullage_l: roundVolume(m.ullage_l, units),
    fill_pct: roundOrNull(m.fill_pct, 1),
    uncertainty_m: u === null || !(u > 0) ? u : roundUncertainty(u, { significantDigits: 2 }).value,
  };
}

/** Measurements of each asset in [from, to), asset by asset and channel by channel in time order. */
export async function* measurementBatches(assets: readonly ExportAsset[], range: ExportRange & { precision?: "measured" | "full"; units: ExportUnits }): Batches {
  const shown = range.precision === "full" ? (m: MeasurementRow) => inUnits(m, range.units) : (m: MeasurementRow) => toMeasuredPrecision(m, range.units);
  for (const asset of assets) {
    // Channels measuring the asset now, and any that did in the past (a replaced device).
    const channels = await sqlRows<{ id: string }>(
      `SELECT id FROM channels WHERE asset_id = $1
       UNION SELECT DISTINCT channel_id FROM measurement_rollups WHERE asset_id = $1 AND bucket_s = 3600 AND bucket_start >= $2 AND bucket_start < $3`,
      [asset.id, new Date(range.from.getTime() - 3_600_000), range.to],
    );
    for (const channel of channels) {
      let after: { at: Date; id: string } = { at: new Date(range.from.getTime() - 1), id: "9223372036854775807" };
      for (;;) {
        const rows = await sqlRows<MeasurementRow>(
          `SELECT m.reading_id, m.at, d.name AS device_name, m.channel_index, m.status, m.tof_us, m.air_temp_c, m.temp_source, m.speed_of_sound_ms,
                  m.raw_distance_m, m.distance_m, m.level_m, m.volume_l, m.fill_pct, m.ullage_l, m.occupied, m.uncertainty_m
             FROM measurements m JOIN devices d ON d.id = m.device_id
            WHERE m.channel_id = $1 AND m.asset_id = $2 AND m.at >= $3 AND m.at < $4 AND (m.at, m.reading_id) > ($5, $6::bigint)
            ORDER BY m.at, m.reading_id LIMIT $7`,
          [channel.id, asset.id, range.from, range.to, after.at, after.id, EXPORT_BATCH_ROWS],
        );
        if (rows.length === 0) break;
        yield rows.map(shown).map((m) => [
          asset.site_name,
          asset.name,
          asset.id,
          m.device_name,
          m.channel_index,
          formatIsoWithOffset(m.at, asset.site_time_zone),
          asset.site_time_zone,
          m.status,
          m.tof_us,
          m.air_temp_c,
          m.temp_source,
          m.speed_of_sound_ms,
          m.raw_distance_m,
          m.distance_m,
          m.level_m,
          m.volume_l,
          m.fill_pct,
          m.ullage_l,
          m.occupied,
          m.uncertainty_m,
        ]);
        const last = rows[rows.length - 1];
        after = { at: new Date(last.at), id: last.reading_id };
        if (rows.length < EXPORT_BATCH_ROWS) break;
      }
    }
  }
}

export const ALARM_EVENT_COLUMNS = [
  "at",
  "site_time_zone",
  "site",
  "asset",
  "alarm_kind",
  "priority",
  "event",
  "from_state",
  "to_state",
  "cause",
  "value",
  "setpoint",
  "unit",
  "by",
  "comment",
  "alarm_id",
] as const;

interface AlarmEventRow {
  id: string;
  at: Date;
  site_name: string;
  time_zone: string;
  asset_name: string | null;
  alarm_kind: string;
  priority: string | null;
  kind: string;
  from_state: string | null;
  to_state: string | null;
  cause: string;
  value: number | null;
  setpoint: number | null;
  unit: string | null;
  actor_label: string | null;
  actor_name: string | null;
  comment: string | null;
  alarm_id: string;
}

/** Every alarm event (activations, acknowledgements, shelving, notifications…) in [from, to), in time order. */
export async function* alarmEventBatches(scope: Scope, range: ExportRange, units: ExportUnits): Batches {
  // Level alarms are judged in metres; their value and setpoint go out in the export's length unit.
  const inLength = (e: AlarmEventRow) => e.unit === "m";
  let after: { at: Date; id: string } = { at: new Date(range.from.getTime() - 1), id: "0" };
  for (;;) {
    const rows = await sqlRows<AlarmEventRow>(
      `SELECT e.id, e.at, s.name AS site_name, s.time_zone, a.name AS asset_name, al.kind AS alarm_kind, coalesce(e.priority, al.priority) AS priority,
              e.kind, e.from_state, e.to_state, e.cause, e.value, e.setpoint, al.unit, e.actor_label, u.name AS actor_name, e.comment, e.alarm_id
         FROM alarm_events e JOIN alarms al ON al.id = e.alarm_id JOIN sites s ON s.id = al.site_id LEFT JOIN assets a ON a.id = al.asset_id
              LEFT JOIN users u ON u.id = e.user_id
        WHERE e.organisation_id = $1 AND ${siteScope(scope, "al.site_id")} AND e.at >= $2 AND e.at < $3 AND (e.at, e.id) > ($4, $5::bigint)
        ORDER BY e.at, e.id LIMIT $6`,
      [scope.organisationId, range.from, range.to, after.at, after.id, EXPORT_BATCH_ROWS],
    );
    if (rows.length === 0) return;
    yield rows.map((e) => [
      formatIsoWithOffset(e.at, e.time_zone),
      e.time_zone,
      e.site_name,
      e.asset_name,
      e.alarm_kind,
      e.priority,
      e.kind,
      e.from_state,
      e.to_state,
      textFor(scope, e.cause),
      inLength(e) ? units.length(e.value) : e.value,
      inLength(e) ? units.length(e.setpoint) : e.setpoint,
      inLength(e) ? UNIT_SYMBOLS[units.level] : e.unit,
      personLabel(scope, e.actor_label, e.actor_name),
      e.comment,
      e.alarm_id,
    ]);
    const last = rows[rows.length - 1];
    after = { at: new Date(last.at), id: last.id };
    if (rows.length < EXPORT_BATCH_ROWS) return;
  }
}

export const REFILL_PLAN_COLUMNS = [
  "due_at",
  "site_time_zone",
  "site",
  "tank",
  "purpose",
  "status",
  "action",
  "days_to_due",
  "days_to_limit",
  "volume_l",
  "needs_check",
  "current_volume_l",
  "fill_pct",
  "capacity_l",
  "safe_fill_pct",
  "measured_at",
  "asset_id",
] as const;

const round = (x: number | null, digits: number) => (x === null ? null : Math.round(x * 10 ** digits) / 10 ** digits);

/**
 * The refill plan is short (one row a tank): one batch. A tank that needs a check has no due date and
 * says why; tanks without a ready forecast are not in the export (the screen lists them apart).
 */
export function refillPlanColumns(units: ExportUnits): string[] {
  return REFILL_PLAN_COLUMNS.map(units.column);
}

export async function* refillPlanBatches(scope: Scope, options: { horizonDays: number; siteId?: string; units: ExportUnits }): Batches {
  const volume = (l: number | null) => round(options.units.litres(l), 1);
  const plan = await refillPlan(scope, options);
  yield plan.items.map((r) => [
    r.due_at === null ? null : formatIsoWithOffset(r.due_at, r.site_time_zone),
    r.site_time_zone,
    r.site_name,
    r.asset_name,
    r.purpose,
    r.status,
    r.action,
    round(r.days_to_due, 2),
    round(r.days_to_limit, 2),
    volume(r.volume_l),
    r.checks.map((c) => c.text).join("; ") || null,
    volume(r.current_volume_l),
    round(r.fill_pct, 1),
    volume(r.capacity_l),
    r.safe_fill_pct,
    r.measured_at === null ? null : formatIsoWithOffset(r.measured_at, r.site_time_zone),
    r.asset_id,
  ]);
}

