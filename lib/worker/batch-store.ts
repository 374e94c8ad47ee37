// Set-based reads and writes the worker shares between its queue batches and its recomputes: one
// statement per table per batch, arrays passed as parameters and unnested in SQL, never a query per
// reading.

import type { Transaction } from "sequelize";
import { decodeBase64Row, decodeBinaryArray, sendArray } from "./binary-arrays";
import { QUEUED_READING_COLUMNS } from "./reading-queue";
import type { TankGeometry } from "../geometry/tank-volume";
import { parseChannelState } from "./compute/channel-state";
import type { FlagChanges } from "./compute/health";
import type { NewTemperatureSample, SessionRow, StoredChannelState } from "./compute/batch";
import { PIPELINE_SETTINGS } from "./compute/settings";
import type { TemperatureSample } from "./compute/air-temperature";
import type { AssetKind, ChannelConfig, Measurement, ReadingRow, SignalProfile } from "./compute/types";
import { sqlRows, sqlRun } from "../db/sql";
import { OFFLINE_AFTER_INTERVALS, isGapObservedLive, observedOutages } from "../alarms/late-history";

// ── Readings ────────────────────────────────────────────────────────────────────────────────────

// Readings come back as one row of binary arrays, a column each: formatting 25 000 rows' floats and
// times as text (or JSON) cost PostgreSQL more than finding them.
const READING_COLUMNS = ["id", "at", ...QUEUED_READING_COLUMNS];
// A burst's samples travel as their own binary array inside a bytea element.
const READING_ARRAYS = READING_COLUMNS.map((c) => `${sendArray(`array_agg(${c === "samples_us" ? "array_send(r.samples_us)" : `r.${c}`})`)} AS ${c}`).join(", ");


/**
 * Microseconds past each reading's millisecond, by reading id, where not zero: a Date keeps only
 * milliseconds, and the measurement must carry its reading's time exactly (it is half its key). Kept
 * beside the readings by the claim and encode layers, so the computing stages see plain records.
 */
export type SubMillis = ReadonlyMap<number, number>;

/** A reading's time in microseconds since 1970, exactly as the database holds it. */
export const exactMicros = (r: ReadingRow, subMillis: SubMillis): number => r.at.getTime() * 1000 + (subMillis.get(r.id) ?? 0);

/** Readings as the claim layer fetched them, in time order (then id), with their exact times. */
export interface FetchedReadings {
  readings: ReadingRow[];
  subMillis: SubMillis;
}

function readingsFromColumns(row: Record<string, Buffer | null>): FetchedReadings {
  const id = decodeBinaryArray(row.id, "int8");
  const deviceId = decodeBinaryArray(row.device_id, "uuid");
  const channel = decodeBinaryArray(row.channel, "int2");
  const at = decodeBinaryArray(row.at, "timestamptz");
  const echoUs = decodeBinaryArray(row.echo_us, "float8");
  const ticks = decodeBinaryArray(row.ticks, "int8");
  const overflows = decodeBinaryArray(row.overflows, "int4");
  const samplesUs = decodeBinaryArray(row.samples_us, "bytea");
  const pulseUs = decodeBinaryArray(row.pulse_us, "float8");
  const highUs = decodeBinaryArray(row.high_us, "float8");
  const periodUs = decodeBinaryArray(row.period_us, "float8");
  const airTempC = decodeBinaryArray(row.air_temp_c, "float8");
  const n = id.length;
  // Time order (then id), by position, before any record is built.
  let order: number[] | null = null;
  for (let i = 1; i < n; i++) {
    if (at[i - 1]! > at[i]! || (at[i - 1] === at[i] && id[i - 1]! > id[i]!)) {
      order = Array.from({ length: n }, (_, k) => k).sort((a, b) => at[a]! - at[b]! || id[a]! - id[b]!);
      break;
    }
  }
  const readings = new Array<ReadingRow>(n);
  const subMillis = new Map<number, number>();
  for (let k = 0; k < n; k++) {
    const i = order === null ? k : order[k];
    const ms = Math.floor(at[i]! / 1000);
    const sub = at[i]! - ms * 1000;
    if (sub !== 0) subMillis.set(id[i]!, sub);
    readings[k] = {
      id: id[i]!,
      deviceId: deviceId[i]!,
      channel: channel[i]!,
      at: new Date(ms),
      echoUs: echoUs[i],
      ticks: ticks[i],
      overflows: overflows[i],
      samplesUs: samplesUs[i] === null ? null : (decodeBinaryArray(samplesUs[i], "float8") as number[]),
      pulseUs: pulseUs[i],
      highUs: highUs[i],
      periodUs: periodUs[i],
      airTempC: airTempC[i],
    };
  }
  return { readings, subMillis };
}

/**
 * SQL for the readings of a source that names its rows `r` (e.g. "readings r WHERE …", with `id`,
 * `at` and the queued columns) as one row of binary arrays.
 */
export const readingsAsArrays = (source: string) => `SELECT ${READING_ARRAYS} FROM (SELECT ${READING_COLUMNS.map((c) => `r.${c}`).join(", ")} FROM ${source}) r`;

/** Readings of a statement built with readingsAsArrays, in time order (then id); ids and microsecond times stay below 2^53. */
export async function fetchReadings(sql: string, bind: unknown[], transaction: Transaction): Promise<FetchedReadings> {
  const [row] = await sqlRows<Record<string, string | null>>(sql, bind, { transaction });
  return row ? readingsFromColumns(decodeBase64Row(row)) : { readings: [], subMillis: new Map() };
}

/** SQL for a timestamptz from microseconds since 1970, exact (a Date would round to milliseconds). */
export const MICROS_TO_TIMESTAMPTZ = (param: string) => `(timestamptz 'epoch' + ${param}::bigint * interval '1 microsecond')`;

// ── Configuration ───────────────────────────────────────────────────────────────────────────────

interface ChannelDbRow {
  channel_id: string;
  index: number;
  min_range_m: number;
  max_range_m: number;
  face_offset_m: number;
  calibration_offset_m: number;
  calibration_scale: number;
  stated_accuracy_m: number | null;
  calibration_rms_m: number | null;
  device_id: string;
  site_id: string;
  profile: SignalProfile;
  clock_hz: number | null;
  prescaler: number | null;
  timer_bits: number | null;
  us_per_mm: number | null;
  zero_m: number | null;
  span_m: number | null;
  expected_interval_s: number;
  site_air_temp_c: number | null;
  humidity_pct: number | null;
  asset_id: string | null;
  kind: AssetKind | null;
  mount_height_m: number | null;
  capacity_l: number | null;
  geometry: TankGeometry | null;
  floor_distance_m: number | null;
  occupied_below_m: number | null;
  reorder_pct: number | null;
}

const CHANNEL_SELECT = `
  SELECT c.id AS channel_id, c.index, c.min_range_m, c.max_range_m, c.face_offset_m, c.calibration_offset_m, c.calibration_scale, c.stated_accuracy_m,
         (SELECT cc.rms_after_m FROM calibration_changes cc WHERE cc.channel_id = c.id ORDER BY cc.at DESC LIMIT 1) AS calibration_rms_m,
         d.id AS device_id, d.site_id, d.profile, d.clock_hz, d.prescaler, d.timer_bits, d.us_per_mm, d.zero_m, d.span_m, d.expected_interval_s,
         s.air_temp_c AS site_air_temp_c, s.humidity_pct,
         a.id AS asset_id, a.kind, a.mount_height_m, a.capacity_l, a.geometry, a.floor_distance_m, a.occupied_below_m, a.reorder_pct
  FROM channels c
  JOIN devices d ON d.id = c.device_id
  JOIN sites s ON s.id = d.site_id
  LEFT JOIN assets a ON a.id = c.asset_id`;

function toChannelConfig(r: ChannelDbRow): ChannelConfig {
  return {
    id: r.channel_id,
    index: r.index,
    minRangeM: r.min_range_m,
    maxRangeM: r.max_range_m,
    faceOffsetM: r.face_offset_m,
    calibrationOffsetM: r.calibration_offset_m,
    calibrationScale: r.calibration_scale,
    statedAccuracyM: r.stated_accuracy_m,
    calibrationRmsM: r.calibration_rms_m,
    device: {
      id: r.device_id,
      siteId: r.site_id,
      profile: r.profile,
      clockHz: r.clock_hz,
      prescaler: r.prescaler,
      timerBits: r.timer_bits,
      usPerMm: r.us_per_mm,
      zeroM: r.zero_m,
      spanM: r.span_m,
      expectedIntervalS: r.expected_interval_s,
    },
    site: { id: r.site_id, airTempC: r.site_air_temp_c, humidityPct: r.humidity_pct },
    asset:
      r.asset_id === null || r.kind === null
        ? null
        : {
            id: r.asset_id,
            kind: r.kind,
            mountHeightM: r.mount_height_m,
            capacityL: r.capacity_l,
            geometry: r.geometry,
            floorDistanceM: r.floor_distance_m,
            occupiedBelowM: r.occupied_below_m,
            reorderPct: r.reorder_pct,
          },
  };
}

/** Every channel of the given devices, as the pipeline needs them. */
export async function loadChannelsOfDevices(deviceIds: string[], transaction?: Transaction): Promise<ChannelConfig[]> {
  if (deviceIds.length === 0) return [];
  const rows = await sqlRows<ChannelDbRow>(`${CHANNEL_SELECT} WHERE c.device_id = ANY($1::uuid[])`, [deviceIds], { transaction });
  return rows.map(toChannelConfig);
}

export async function loadChannel(channelId: string, transaction?: Transaction): Promise<ChannelConfig | null> {
  const rows = await sqlRows<ChannelDbRow>(`${CHANNEL_SELECT} WHERE c.id = $1`, [channelId], { transaction });
  return rows.length ? toChannelConfig(rows[0]) : null;
}

/** Channel id → the sites that take it as their temperature channel. */
export async function loadTemperatureChannelSites(channelIds: string[], transaction?: Transaction): Promise<Map<string, string[]>> {
  const map = new Map<string, string[]>();
  if (channelIds.length === 0) return map;
  const rows = await sqlRows<{ id: string; temperature_channel_id: string }>(
    `SELECT id, temperature_channel_id FROM sites WHERE temperature_channel_id = ANY($1::uuid[])`,
    [channelIds],
    { transaction },
  );
  for (const r of rows) map.set(r.temperature_channel_id, [...(map.get(r.temperature_channel_id) ?? []), r.id]);
  return map;
}

/** Stored temperature samples of the sites, around [from, to] by the interpolation gap. */
export async function loadTemperatureSamples(siteIds: string[], from: Date, to: Date, transaction?: Transaction): Promise<Map<string, TemperatureSample[]>> {
  const map = new Map<string, TemperatureSample[]>();
  if (siteIds.length === 0) return map;
  const rows = await sqlRows<{ site_id: string; at: Date; air_temp_c: number }>(
    `SELECT site_id, at, air_temp_c FROM temperature_samples
     WHERE site_id = ANY($1::uuid[]) AND at BETWEEN $2::timestamptz - make_interval(secs => $4) AND $3::timestamptz + make_interval(secs => $4)`,
    [siteIds, from, to, PIPELINE_SETTINGS.tempInterpolationMaxGapS],
    { transaction },
  );
  for (const r of rows) {
    const list = map.get(r.site_id) ?? [];
    list.push({ atMs: r.at.getTime(), airTempC: r.air_temp_c });
    map.set(r.site_id, list);
  }
  return map;
}

// ── Channel state ───────────────────────────────────────────────────────────────────────────────

export interface LockedChannelState extends StoredChannelState {
  /** The row's version when it was locked; every write adds one. */
  version: number;
}

/**
 * Locks the channels' state rows (creating missing ones) in channel-id order, so two workers that
 * share channels wait for each other instead of deadlocking or interleaving a channel's history.
 */
export async function lockChannelStates(channelIds: string[], transaction: Transaction): Promise<Map<string, LockedChannelState>> {
  const map = new Map<string, LockedChannelState>();
  if (channelIds.length === 0) return map;
  const sorted = [...new Set(channelIds)].sort();
  await sqlRun(`INSERT INTO channel_state (channel_id) SELECT unnest($1::uuid[]) ON CONFLICT DO NOTHING`, [sorted], { transaction });
  const rows = await sqlRows<{ channel_id: string; state: unknown; offline_since: Date | null; version: string }>(
    `SELECT channel_id, state, offline_since, version FROM channel_state WHERE channel_id = ANY($1::uuid[]) ORDER BY channel_id FOR UPDATE`,
    [sorted],
    { transaction },
  );
  for (const r of rows) map.set(r.channel_id, { state: parseChannelState(r.state), offlineSince: r.offline_since, version: Number(r.version) });
  return map;
}


// ── Sessions, temperature samples, flags ────────────────────────────────────────────────────────

export async function upsertSessions(sessions: readonly SessionRow[], transaction: Transaction): Promise<void> {
  if (sessions.length === 0) return;
  await sqlRun(
    `INSERT INTO occupancy_sessions (asset_id, channel_id, started_at, ended_at, duration_s)
     SELECT * FROM unnest($1::uuid[], $2::uuid[], $3::timestamptz[], $4::timestamptz[], $5::float8[])
     ON CONFLICT (channel_id, started_at) DO UPDATE SET ended_at = excluded.ended_at, duration_s = excluded.duration_s`,
    [sessions.map((s) => s.assetId), sessions.map((s) => s.channelId), sessions.map((s) => s.start), sessions.map((s) => s.end), sessions.map((s) => s.durationS)],
    { transaction },
  );
}

/**
 * Keeps each channel's newest valid measurement (channel_latest) for the live screens: of the given
 * measurements (those this write stored), each channel's newest with status ok, by (time, reading id).
 * A late or backfilled older one never replaces a newer value; the same reading measured again does.
 */
export async function upsertLatestValues(measurements: readonly Measurement[], subMillis: SubMillis, transaction: Transaction): Promise<void> {
  const newest = new Map<string, { m: Measurement; micros: number }>();
  for (const m of measurements) {
    if (m.status !== "ok" || !m.channel) continue;
    const micros = exactMicros(m.reading, subMillis);
    const held = newest.get(m.channel.id);
    if (!held || micros > held.micros || (micros === held.micros && m.reading.id > held.m.reading.id)) newest.set(m.channel.id, { m, micros });
  }
  if (newest.size === 0) return;
  const rows = [...newest].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)).map(([, v]) => v);
  await sqlRun(
    `INSERT INTO channel_latest AS l (channel_id, reading_id, at, distance_m, level_m, volume_l, fill_pct, uncertainty_m, occupied)
     SELECT v.channel_id, v.reading_id, ${MICROS_TO_TIMESTAMPTZ("v.at_us")}, v.distance_m, v.level_m, v.volume_l, v.fill_pct, v.uncertainty_m, v.occupied
     FROM unnest($1::uuid[], $2::int8[], $3::int8[], $4::float8[], $5::float8[], $6::float8[], $7::float8[], $8::float8[], $9::bool[])
       AS v(channel_id, reading_id, at_us, distance_m, level_m, volume_l, fill_pct, uncertainty_m, occupied)
     ON CONFLICT (channel_id) DO UPDATE SET reading_id = excluded.reading_id, at = excluded.at, distance_m = excluded.distance_m, level_m = excluded.level_m,
       volume_l = excluded.volume_l, fill_pct = excluded.fill_pct, uncertainty_m = excluded.uncertainty_m, occupied = excluded.occupied
     WHERE (excluded.at, excluded.reading_id) >= (l.at, l.reading_id)`,
    [
      rows.map((r) => r.m.channel?.id),
      rows.map((r) => r.m.reading.id),
      rows.map((r) => r.micros),
      rows.map((r) => r.m.distanceM),
      rows.map((r) => r.m.levelM),
      rows.map((r) => r.m.volumeL),
      rows.map((r) => r.m.fillPct),
      rows.map((r) => r.m.uncertaintyM),
      rows.map((r) => r.m.occupied),
    ],
    { transaction },
  );
}

/** After a recompute deleted a channel's measurements: its latest value again from what remains (the replay then moves it on). */
export async function resetLatestValue(channelId: string, transaction: Transaction): Promise<void> {
  await sqlRun(`DELETE FROM channel_latest WHERE channel_id = $1`, [channelId], { transaction });
  await sqlRun(
    `INSERT INTO channel_latest (channel_id, reading_id, at, distance_m, level_m, volume_l, fill_pct, uncertainty_m, occupied)
     SELECT m.channel_id, m.reading_id, m.at, m.distance_m, m.level_m, m.volume_l, m.fill_pct, m.uncertainty_m, m.occupied
     FROM measurements m WHERE m.channel_id = $1 AND m.status = 'ok' ORDER BY m.at DESC, m.reading_id DESC LIMIT 1`,
    [channelId],
    { transaction },
  );
}

export async function insertTemperatureSamples(samples: readonly NewTemperatureSample[], transaction: Transaction): Promise<void> {
  if (samples.length === 0) return;
  // One value per (site, time): the last one in the batch wins, as a later resend would.
  const unique = new Map<string, NewTemperatureSample>();
  for (const s of samples) unique.set(`${s.siteId}|${s.atMs}`, s);
  const list = [...unique.values()];
  await sqlRun(
    `INSERT INTO temperature_samples (site_id, at, air_temp_c, source)
     SELECT site_id, at, air_temp_c, 'channel' FROM unnest($1::uuid[], $2::timestamptz[], $3::float8[]) AS v(site_id, at, air_temp_c)
     ON CONFLICT (site_id, at, source) DO UPDATE SET air_temp_c = excluded.air_temp_c`,
    [list.map((s) => s.siteId), list.map((s) => new Date(s.atMs)), list.map((s) => s.airTempC)],
    { transaction },
  );
}

/**
 * Offline intervals are gaps between measurement times inside a batch; only those during which no
 * reading ARRIVED for the offline limit were outages (late-history.ts rule 3). A backfill or an import
 * fills a gap with readings that arrived together: a data gap, not an offline period.
 */
async function keepOutagesObservedLive(intervals: FlagChanges["intervals"], transaction: Transaction): Promise<FlagChanges["intervals"]> {
  const gaps = intervals.map((x, i) => ({ x, i })).filter(({ x }) => x.flag === "offline");
  if (gaps.length === 0) return intervals;
  const intervalS = (x: FlagChanges["intervals"][number]) => Number((x.details as { expected_interval_s?: number }).expected_interval_s) || 60;
  const gapFrom = (x: FlagChanges["intervals"][number]) => new Date(x.since.getTime() - OFFLINE_AFTER_INTERVALS * intervalS(x) * 1000);
  const arrivals = await sqlRows<{ i: number; received_at: Date }>(
    `SELECT v.i, r.received_at
     FROM unnest($1::uuid[], $2::timestamptz[], $3::timestamptz[], $4::int[]) AS v(channel_id, gap_from, gap_to, i)
     JOIN channels ch ON ch.id = v.channel_id
     JOIN readings r ON r.device_id = ch.device_id AND r.channel = ch.index AND r.at >= v.gap_from AND r.at <= v.gap_to`,
    [gaps.map(({ x }) => x.channelId), gaps.map(({ x }) => gapFrom(x)), gaps.map(({ x }) => x.clearedAt), gaps.map(({ i }) => i)],
    { transaction },
  );
  const now = new Date();
  const dropped = new Set<number>();
  for (const { x, i } of gaps) {
    const seen = arrivals.filter((a) => a.i === i).map((a) => a.received_at);
    const outages = observedOutages(seen, intervalS(x), now);
    if (!isGapObservedLive(gapFrom(x), x.clearedAt, outages, now)) dropped.add(i);
  }
  return intervals.filter((_, i) => !dropped.has(i));
}

export async function applyFlagChanges(flags: FlagChanges, offlineCleared: readonly { channelId: string; at: Date }[], transaction: Transaction): Promise<void> {
  const clears = [...flags.clears, ...offlineCleared.map((o) => ({ channelId: o.channelId, flag: "offline" as const, at: o.at }))];
  if (clears.length) {
    await sqlRun(
      `UPDATE health_flags f SET cleared_at = greatest(f.since, v.at), updated_at = now()
       FROM unnest($1::uuid[], $2::text[], $3::timestamptz[]) AS v(channel_id, flag, at)
       WHERE f.channel_id = v.channel_id AND f.flag = v.flag AND f.cleared_at IS NULL`,
      [clears.map((c) => c.channelId), clears.map((c) => c.flag), clears.map((c) => c.at)],
      { transaction },
    );
  }
  const intervals = await keepOutagesObservedLive(flags.intervals, transaction);
  if (intervals.length) {
    const f = intervals;
    await sqlRun(
      `INSERT INTO health_flags (channel_id, flag, since, cleared_at, magnitude, details)
       SELECT * FROM unnest($1::uuid[], $2::text[], $3::timestamptz[], $4::timestamptz[], $5::float8[], $6::jsonb[])`,
      [f.map((x) => x.channelId), f.map((x) => x.flag), f.map((x) => x.since), f.map((x) => x.clearedAt), f.map((x) => x.magnitude), f.map((x) => JSON.stringify(x.details))],
      { transaction },
    );
  }
  if (flags.opens.length) {
    const f = flags.opens;
    await sqlRun(
      `INSERT INTO health_flags (channel_id, flag, since, magnitude, details)
       SELECT * FROM unnest($1::uuid[], $2::text[], $3::timestamptz[], $4::float8[], $5::jsonb[])
       ON CONFLICT (channel_id, flag) WHERE cleared_at IS NULL
       DO UPDATE SET magnitude = excluded.magnitude, details = health_flags.details || excluded.details, updated_at = now()`,
      [f.map((x) => x.channelId), f.map((x) => x.flag), f.map((x) => x.since), f.map((x) => x.magnitude), f.map((x) => JSON.stringify(x.details))],
      { transaction },
    );
  }
}
