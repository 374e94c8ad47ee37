// Reading what the worker derived: a channel's measurements, an asset's rollup series, a channel's
// health flags. Every function is scoped to an organisation; an id of another one is "not found".

import { siteScope, type Scope } from "../db/site-scope";
import { AppError, notFound } from "../errors";
import { median } from "../signal/robust-stats";
import { parseChannelState } from "../worker/compute/channel-state";
import {
  resolvePeriod,
  SERIES_BUCKET_SECONDS,
  SERIES_FIELDS,
  SERIES_MAX_DAYS,
  type HealthQuery,
  type MeasurementsQuery,
  type SeriesField,
  type SeriesQuery,
} from "../validations/measurement";
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

const SERIES_DEFAULT_DAYS = { "5m": 1, "1h": 7 } as const;

// Each figure of a bucket from the rollups of the asset's channels: means from sums over the valid
// measurements, extremes from the buckets' extremes.
const mean = (sum: string, n = "n") => `sum(${sum}) / nullif(sum(${n}), 0)`;
const FIELD_SQL: Record<SeriesField, string> = {
  n: "sum(n)::int",
  n_all: "sum(n_all)::int",
  distance_m: mean("distance_sum"),
  distance_min_m: "min(distance_min)",
  distance_max_m: "max(distance_max)",
  level_m: mean("level_sum"),
  level_min_m: "min(level_min)",
  level_max_m: "max(level_max)",
  volume_l: mean("volume_sum"),
  volume_min_l: "min(volume_min)",
  volume_max_l: "max(volume_max)",
  fill_pct: mean("fill_sum"),
  fill_min_pct: "min(fill_min)",
  fill_max_pct: "max(fill_max)",
  air_temp_c: mean("air_temp_sum", "air_temp_n"),
  air_temp_min_c: "min(air_temp_min)",
  air_temp_max_c: "max(air_temp_max)",
  uncertainty_m: mean("uncertainty_sum"),
  occupied_fraction: "sum(occupied_n)::float8 / nullif(sum(n), 0)",
};

/** The series of the given figures, one row per bucket: `at_ms` (epoch milliseconds) and a column per figure. */
function seriesSql(fields: readonly SeriesField[]) {
  return `SELECT (extract(epoch FROM bucket_start) * 1000)::float8 AS at_ms, ${fields.map((f) => `${FIELD_SQL[f]} AS ${f}`).join(", ")}
     FROM measurement_rollups
     WHERE asset_id = $1 AND bucket_s = $2 AND bucket_start >= $3 AND bucket_start <= $4
     GROUP BY bucket_start ORDER BY bucket_start`;
}

/** GET /api/assets/{id}/series: one point per bucket with count, mean, min and max (valid measurements only). */
export async function assetSeries(scope: Scope, assetId: string, query: SeriesQuery) {
  const { from, to } = resolvePeriod(query, SERIES_DEFAULT_DAYS[query.bucket]);
  if (to.getTime() - from.getTime() > SERIES_MAX_DAYS[query.bucket] * 86_400_000) {
    throw new AppError("invalid", `The period is at most ${SERIES_MAX_DAYS[query.bucket]} days for ${query.bucket} buckets.`, { fields: { to: "Shorten the period." } });
  }
  // Only the figures asked for are computed and sent (in the order of SERIES_FIELDS, so that one
  // prepared statement serves each set); the scope check runs beside the series, which is dropped unread
  // when the asset is not the reader's.
  const fields = query.fields ? SERIES_FIELDS.filter((f) => query.fields?.includes(f)) : SERIES_FIELDS;
  const [inScope, rows] = await Promise.all([
    sqlRows<{ id: string }>(`SELECT id FROM assets WHERE id = $1 AND organisation_id = $2 AND ${siteScope(scope, "site_id")}`, [assetId, scope.organisationId], {
      name: "asset_in_scope",
    }),
    sqlRows<Record<SeriesField | "at_ms", number | null>>(seriesSql(fields), [assetId, SERIES_BUCKET_SECONDS[query.bucket], from, to], { name: "asset_series" }),
  ]);
  if (!inScope.length) throw notFound("That asset");
  const head = { asset_id: assetId, bucket: query.bucket, from, to };
  if (!query.fields) return { ...head, items: rows.map(({ at_ms, ...figures }) => ({ at: new Date(at_ms as number), ...figures })) };
  // Column-wise for charts: times as epoch milliseconds, each figure once per bucket, rounded to the
  // resolution below (a 30-day hourly series of four figures is about 30 KB instead of 430 KB as items).
  const columns: Record<string, (number | null)[]> = { at: rows.map((r) => r.at_ms) };
  for (const field of query.fields) columns[field] = rows.map((r) => roundForField(field, r[field]));
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
