// Reading what the worker derived: a channel's measurements, an asset's rollup series, a channel's
// health flags. Every function is scoped to an organisation; an id of another one is "not found".

import { siteScope, type Scope } from "../db/site-scope";
import { AppError, notFound } from "../errors";
import { median } from "../signal/robust-stats";
import { parseChannelState } from "../worker/compute/channel-state";
import {
  resolvePeriod,
  SERIES_BUCKET_SECONDS,
  SERIES_MAX_DAYS,
  type HealthQuery,
  type MeasurementsQuery,
  type SeriesField,
  type SeriesQuery,
} from "../validations/measurement";
import { findAsset } from "../services/assets";
import { sqlRows } from "../db/sql";

interface ChannelRow {
  id: string;
  device_id: string;
  index: number;
  asset_id: string | null;
  expected_interval_s: number;
}

/** The channel, if it belongs to a device of the organisation. */
export async function findChannel(scope: Scope, channelId: string): Promise<ChannelRow> {
  const [row] = await sqlRows<ChannelRow>(
    `SELECT c.id, c.device_id, c.index, c.asset_id, d.expected_interval_s FROM channels c JOIN devices d ON d.id = c.device_id
     WHERE c.id = $1 AND d.organisation_id = $2 AND ${siteScope(scope, "d.site_id")}`,
    [channelId, scope.organisationId],
  );
  if (!row) throw notFound("That channel");
  return row;
}

interface MeasurementRow {
  reading_id: string;
  at: Date;
  status: string;
  status_detail: string | null;
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

export function serialiseMeasurement(m: MeasurementRow) {
  return {
    at: m.at,
    status: m.status,
    tof_us: m.tof_us,
    air_temp_c: m.air_temp_c,
    speed_of_sound_ms: m.speed_of_sound_ms,
    distance_m: m.distance_m,
    level_m: m.level_m,
    volume_l: m.volume_l,
    fill_pct: m.fill_pct,
    occupied: m.occupied,
    uncertainty_m: m.uncertainty_m,
    reading_id: Number(m.reading_id),
    status_detail: m.status_detail,
    temp_source: m.temp_source,
    raw_distance_m: m.raw_distance_m,
    ullage_l: m.ullage_l,
  };
}
export type MeasurementJson = ReturnType<typeof serialiseMeasurement>;

const MEASUREMENTS_DEFAULT_DAYS = 30;

/** GET /api/channels/{id}/measurements: newest first by default, at most `limit`, within [from, to]. */
export async function listChannelMeasurements(scope: Scope, channelId: string, query: MeasurementsQuery) {
  await findChannel(scope, channelId);
  const { from, to } = resolvePeriod(query, MEASUREMENTS_DEFAULT_DAYS);
  const rows = await sqlRows<MeasurementRow>(
    `SELECT reading_id, at, status, status_detail, tof_us, air_temp_c, temp_source, speed_of_sound_ms, raw_distance_m, distance_m,
            level_m, volume_l, fill_pct, ullage_l, occupied, uncertainty_m
     FROM measurements WHERE channel_id = $1 AND at >= $2 AND at <= $3
     ORDER BY at ${query.order === "asc" ? "ASC" : "DESC"}, reading_id ${query.order === "asc" ? "ASC" : "DESC"} LIMIT $4`,
    [channelId, from, to, query.limit],
  );
  return { channel_id: channelId, from, to, items: rows.map(serialiseMeasurement) };
}

interface RollupRow {
  bucket_start: Date;
  n: number;
  n_all: number;
  distance_mean: number | null;
  distance_min: number | null;
  distance_max: number | null;
  level_mean: number | null;
  level_min: number | null;
  level_max: number | null;
  volume_mean: number | null;
  volume_min: number | null;
  volume_max: number | null;
  fill_mean: number | null;
  fill_min: number | null;
  fill_max: number | null;
  air_temp_mean: number | null;
  air_temp_min: number | null;
  air_temp_max: number | null;
  uncertainty_mean: number | null;
  occupied_fraction: number | null;
}

const SERIES_DEFAULT_DAYS = { "5m": 1, "1h": 7 } as const;

/** GET /api/assets/{id}/series: one point per bucket with count, mean, min and max (valid measurements only). */
export async function assetSeries(scope: Scope, assetId: string, query: SeriesQuery) {
  await findAsset(scope, assetId);
  const { from, to } = resolvePeriod(query, SERIES_DEFAULT_DAYS[query.bucket]);
  if (to.getTime() - from.getTime() > SERIES_MAX_DAYS[query.bucket] * 86_400_000) {
    throw new AppError("invalid", `The period is at most ${SERIES_MAX_DAYS[query.bucket]} days for ${query.bucket} buckets.`, { fields: { to: "Shorten the period." } });
  }
  const bucketS = SERIES_BUCKET_SECONDS[query.bucket];
  const rows = await sqlRows<RollupRow>(
    `SELECT bucket_start, sum(n)::int AS n, sum(n_all)::int AS n_all,
            sum(distance_sum) / nullif(sum(n), 0) AS distance_mean, min(distance_min) AS distance_min, max(distance_max) AS distance_max,
            sum(level_sum) / nullif(sum(n), 0) AS level_mean, min(level_min) AS level_min, max(level_max) AS level_max,
            sum(volume_sum) / nullif(sum(n), 0) AS volume_mean, min(volume_min) AS volume_min, max(volume_max) AS volume_max,
            sum(fill_sum) / nullif(sum(n), 0) AS fill_mean, min(fill_min) AS fill_min, max(fill_max) AS fill_max,
            sum(air_temp_sum) / nullif(sum(air_temp_n), 0) AS air_temp_mean, min(air_temp_min) AS air_temp_min, max(air_temp_max) AS air_temp_max,
            sum(uncertainty_sum) / nullif(sum(n), 0) AS uncertainty_mean,
            sum(occupied_n)::float8 / nullif(sum(n), 0) AS occupied_fraction
     FROM measurement_rollups
     WHERE asset_id = $1 AND bucket_s = $2 AND bucket_start >= $3 AND bucket_start <= $4
     GROUP BY bucket_start ORDER BY bucket_start`,
    [assetId, bucketS, from, to],
  );
  const items = rows.map((r) => ({
    at: r.bucket_start,
    n: r.n,
    n_all: r.n_all,
    distance_m: r.distance_mean,
    distance_min_m: r.distance_min,
    distance_max_m: r.distance_max,
    level_m: r.level_mean,
    level_min_m: r.level_min,
    level_max_m: r.level_max,
    volume_l: r.volume_mean,
    volume_min_l: r.volume_min,
    volume_max_l: r.volume_max,
    fill_pct: r.fill_mean,
    fill_min_pct: r.fill_min,
    fill_max_pct: r.fill_max,
    air_temp_c: r.air_temp_mean,
    air_temp_min_c: r.air_temp_min,
    air_temp_max_c: r.air_temp_max,
    uncertainty_m: r.uncertainty_mean,
    occupied_fraction: r.occupied_fraction,
  }));
  const head = { asset_id: assetId, bucket: query.bucket, from, to };
  if (!query.fields) return { ...head, items };
  // Column-wise for charts: times as epoch milliseconds, each figure once per bucket, rounded to the
  // resolution below (a 30-day hourly series of four figures is about 30 KB instead of 430 KB as items).
  const columns: Record<string, (number | null)[]> = { at: items.map((i) => i.at.getTime()) };
  for (const field of query.fields) columns[field] = items.map((i) => roundForField(field, i[field]));
  return { ...head, columns };
}

// 0.1 mm, 0.1 L, 0.01 % and 0.01 °C are finer than any sensor or strapping table resolves.
function roundForField(field: SeriesField, value: number | null): number | null {
  if (value === null) return null;
  const decimals = field.endsWith("_m") ? 4 : field.endsWith("_l") ? 1 : field === "occupied_fraction" ? 3 : field.startsWith("n") ? 0 : 2;
  const scale = 10 ** decimals;
  return Math.round(value * scale) / scale;
}

interface FlagRow {
  id: string;
  flag: string;
  since: Date;
  cleared_at: Date | null;
  magnitude: number | null;
  details: Record<string, unknown>;
  updated_at: Date;
}

/** GET /api/channels/{id}/health: open flags, flags cleared within `days`, and what the worker knows of the channel. */
export async function channelHealth(scope: Scope, channelId: string, query: HealthQuery) {
  const channel = await findChannel(scope, channelId);
  const flags = await sqlRows<FlagRow>(
    `SELECT id, flag, since, cleared_at, magnitude, details, updated_at FROM health_flags
     WHERE channel_id = $1 AND (cleared_at IS NULL OR cleared_at >= now() - make_interval(days => $2))
     ORDER BY cleared_at IS NULL DESC, since DESC LIMIT 500`,
    [channelId, query.days],
  );
  const [state] = await sqlRows<{ last_at: Date | null; offline_since: Date | null; state: unknown }>(
    `SELECT last_at, offline_since, state FROM channel_state WHERE channel_id = $1`,
    [channelId],
  );
  const parsed = parseChannelState(state?.state);
  const serialise = (f: FlagRow) => ({ id: Number(f.id), flag: f.flag, since: f.since, cleared_at: f.cleared_at, magnitude: f.magnitude, details: f.details, updated_at: f.updated_at });
  return {
    channel_id: channelId,
    expected_interval_s: channel.expected_interval_s,
    last_reading_at: state?.last_at ?? null,
    offline_since: state?.offline_since ?? null,
    open: flags.filter((f) => f.cleared_at === null).map(serialise),
    cleared: flags.filter((f) => f.cleared_at !== null).map(serialise),
    // Over the channel's reference distance (an empty bay's floor, a fixed target): the speed of sound the
    // echoes imply relative to c(T). 1 means they agree with the temperature; 1.01 means sound seems 1 % faster than c(T) predicts.
    apparent_speed_ratio: parsed.apparentRatios.length ? median(parsed.apparentRatios) : null,
  };
}
