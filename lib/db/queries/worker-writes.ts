// Set-based reads and writes the worker shares between its queue batches and its recomputes: one
// statement per table per batch, arrays passed as parameters and unnested in SQL, never a query per
// reading.

import { QueryTypes, type Transaction } from "sequelize";
import { getSequelize } from "../sequelize";
import type { TankGeometry } from "../../geometry/tank-volume";
import { parseChannelState, type ChannelState } from "../../pipeline/channel-state";
import type { FlagChanges } from "../../pipeline/health";
import type { NewTemperatureSample, ProcessedBatch, SessionRow, StoredChannelState } from "../../pipeline/batch";
import { PIPELINE_SETTINGS } from "../../pipeline/settings";
import type { TemperatureSample } from "../../pipeline/air-temperature";
import type { AssetKind, ChannelConfig, Measurement, ReadingRow, SignalProfile } from "../../pipeline/types";

export async function sqlRows<T extends object>(sql: string, bind: unknown[], transaction?: Transaction): Promise<T[]> {
  return getSequelize().query<T>(sql, { bind, type: QueryTypes.SELECT, transaction });
}

export async function sqlRun(sql: string, bind: unknown[], transaction?: Transaction): Promise<void> {
  await getSequelize().query(sql, { bind, type: QueryTypes.RAW, transaction });
}

// ── Readings ────────────────────────────────────────────────────────────────────────────────────

// One JSON document per query instead of one protocol row per reading: parsing 25 000 rows column by
// column (and their timestamps into Dates) cost more than the rest of the batch's reading side.
const READING_JSON = `json_build_array(r.id, r.device_id, r.channel, (extract(epoch FROM r.at) * 1000000)::bigint, r.echo_us, r.ticks,
  r.overflows, r.samples_us, r.pulse_us, r.high_us, r.period_us, r.air_temp_c)`;

type ReadingTuple = [number, string, number, number, number | null, number | null, number | null, number[] | null, number | null, number | null, number | null, number | null];

function toReading(t: ReadingTuple): ReadingRow {
  return {
    id: t[0],
    deviceId: t[1],
    channel: t[2],
    at: new Date(Math.floor(t[3] / 1000)),
    atMicros: t[3],
    echoUs: t[4],
    ticks: t[5],
    overflows: t[6],
    samplesUs: t[7],
    pulseUs: t[8],
    highUs: t[9],
    periodUs: t[10],
    airTempC: t[11],
  };
}

/**
 * Readings from a source that names its rows `r` (e.g. "readings r WHERE …"), in the given order.
 * Ids and microsecond times stay below 2^53, so JSON numbers carry them exactly.
 */
export async function fetchReadings(source: string, bind: unknown[], transaction: Transaction, order = "r.at, r.id"): Promise<ReadingRow[]> {
  const [row] = await sqlRows<{ readings: string | null }>(`SELECT json_agg(${READING_JSON} ORDER BY ${order})::text AS readings FROM ${source}`, bind, transaction);
  if (!row?.readings) return [];
  return (JSON.parse(row.readings) as ReadingTuple[]).map(toReading);
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
  SELECT c.id AS channel_id, c.index, c.min_range_m, c.max_range_m, c.face_offset_m, c.calibration_offset_m, c.calibration_scale,
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
  const rows = await sqlRows<ChannelDbRow>(`${CHANNEL_SELECT} WHERE c.device_id = ANY($1::uuid[])`, [deviceIds], transaction);
  return rows.map(toChannelConfig);
}

export async function loadChannel(channelId: string, transaction?: Transaction): Promise<ChannelConfig | null> {
  const rows = await sqlRows<ChannelDbRow>(`${CHANNEL_SELECT} WHERE c.id = $1`, [channelId], transaction);
  return rows.length ? toChannelConfig(rows[0]) : null;
}

/** Channel id → the sites that take it as their temperature channel. */
export async function loadTemperatureChannelSites(channelIds: string[], transaction?: Transaction): Promise<Map<string, string[]>> {
  const map = new Map<string, string[]>();
  if (channelIds.length === 0) return map;
  const rows = await sqlRows<{ id: string; temperature_channel_id: string }>(
    `SELECT id, temperature_channel_id FROM sites WHERE temperature_channel_id = ANY($1::uuid[])`,
    [channelIds],
    transaction,
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
    transaction,
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
  await sqlRun(`INSERT INTO channel_state (channel_id) SELECT unnest($1::uuid[]) ON CONFLICT DO NOTHING`, [sorted], transaction);
  const rows = await sqlRows<{ channel_id: string; state: unknown; offline_since: Date | null; version: string }>(
    `SELECT channel_id, state, offline_since, version FROM channel_state WHERE channel_id = ANY($1::uuid[]) ORDER BY channel_id FOR UPDATE`,
    [sorted],
    transaction,
  );
  for (const r of rows) map.set(r.channel_id, { state: parseChannelState(r.state), offlineSince: r.offline_since, version: Number(r.version) });
  return map;
}

export async function saveChannelStates(states: Map<string, ChannelState>, offlineCleared: Set<string>, transaction: Transaction): Promise<void> {
  if (states.size === 0) return;
  const rows = [...states].map(([id, state]) => ({
    channel_id: id,
    state,
    last_at: state.lastAtMs === null ? null : new Date(state.lastAtMs),
    last_reading_id: state.lastReadingId,
    clear_offline: offlineCleared.has(id),
  }));
  // One JSON document for the whole batch: far cheaper to send than an array of JSON strings.
  await sqlRun(
    `UPDATE channel_state s SET state = v.state, last_at = v.last_at, last_reading_id = v.last_reading_id,
       offline_since = CASE WHEN v.clear_offline THEN NULL ELSE s.offline_since END, version = s.version + 1, updated_at = now()
     FROM json_to_recordset($1::json) AS v(channel_id uuid, state jsonb, last_at timestamptz, last_reading_id bigint, clear_offline boolean)
     WHERE s.channel_id = v.channel_id`,
    [JSON.stringify(rows)],
    transaction,
  );
}

// ── Measurements and rollups ────────────────────────────────────────────────────────────────────

// PostgreSQL array literals built directly (the driver's generic array escaping is slow at these
// sizes): numbers and uuids need no quoting; text is always quoted.
type Kind = "number" | "uuid" | "text" | "boolean";

function element(value: unknown, kind: Kind): string {
  if (value === null || value === undefined) return "NULL";
  switch (kind) {
    case "number":
      return Number.isFinite(value as number) ? String(value) : "NULL";
    case "text":
      return `"${String(value).replace(/[\\"]/g, "\\$&")}"`;
    case "boolean":
      return value ? "t" : "f";
    default:
      return String(value);
  }
}

export function arrayLiteral(values: readonly unknown[], kind: Kind): string {
  // Columns repeat a handful of values (statuses, sources): each is escaped once.
  const seen = new Map<unknown, string>();
  const parts = new Array<string>(values.length);
  for (let i = 0; i < values.length; i++) {
    let part = seen.get(values[i]);
    if (part === undefined) {
      part = element(values[i], kind);
      seen.set(values[i], part);
    }
    parts[i] = part;
  }
  return `{${parts.join(",")}}`;
}

// The binary form of one-dimensional arrays (PostgreSQL's array_send/array_recv; the driver sends a
// Buffer parameter as binary): PostgreSQL parsing 25 000 floats, uuids and times from text took
// longer than inserting the rows.
export type BinaryType = "float8" | "int8" | "int2" | "bool" | "uuid" | "timestamptz";
const ELEMENT_OID: Record<BinaryType, number> = { float8: 701, int8: 20, int2: 21, bool: 16, uuid: 2950, timestamptz: 1184 };
const ELEMENT_SIZE: Record<BinaryType, number> = { float8: 8, int8: 8, int2: 2, bool: 1, uuid: 16, timestamptz: 8 };
// Binary timestamps count microseconds from 2000-01-01 00:00 UTC.
const PG_EPOCH_MICROS = 946_684_800_000_000;
const TWO_32 = 4_294_967_296;

function isNullFor(value: unknown, type: BinaryType): boolean {
  return value === null || value === undefined || (type === "float8" && !Number.isFinite(value as number));
}

function writeInt64(buf: Buffer, value: number, offset: number): void {
  if (Number.isSafeInteger(value) && value >= 0) {
    buf.writeUInt32BE(Math.floor(value / TWO_32), offset);
    buf.writeUInt32BE(value % TWO_32, offset + 4);
  } else {
    buf.writeBigInt64BE(BigInt(Math.trunc(value)), offset);
  }
}

export function binaryArray(values: readonly unknown[], type: BinaryType): Buffer {
  const size = ELEMENT_SIZE[type];
  let present = 0;
  for (const v of values) if (!isNullFor(v, type)) present++;
  const header = values.length ? 20 : 12;
  const buf = Buffer.alloc(header + values.length * 4 + present * size);
  buf.writeInt32BE(values.length ? 1 : 0, 0);
  buf.writeInt32BE(present < values.length ? 1 : 0, 4);
  buf.writeInt32BE(ELEMENT_OID[type], 8);
  if (values.length) {
    buf.writeInt32BE(values.length, 12);
    buf.writeInt32BE(1, 16);
  }
  let o = header;
  // A batch names few devices, channels and assets, many times each: decode each uuid once.
  const uuids = type === "uuid" ? new Map<string, Buffer>() : null;
  for (const v of values) {
    if (isNullFor(v, type)) {
      buf.writeInt32BE(-1, o);
      o += 4;
      continue;
    }
    buf.writeInt32BE(size, o);
    o += 4;
    switch (type) {
      case "float8":
        buf.writeDoubleBE(v as number, o);
        break;
      case "int8":
        writeInt64(buf, v as number, o);
        break;
      case "timestamptz":
        writeInt64(buf, (v as number) - PG_EPOCH_MICROS, o);
        break;
      case "int2":
        buf.writeInt16BE(v as number, o);
        break;
      case "bool":
        buf.writeUInt8(v ? 1 : 0, o);
        break;
      case "uuid": {
        let bytes = uuids!.get(v as string);
        if (!bytes) {
          bytes = Buffer.from((v as string).replace(/-/g, ""), "hex");
          uuids!.set(v as string, bytes);
        }
        bytes.copy(buf, o);
        break;
      }
    }
    o += size;
  }
  return buf;
}

type Column = [name: string, type: BinaryType | "text", value: (m: Measurement) => unknown];

const MEASUREMENT_COLUMNS: Column[] = [
  ["reading_id", "int8", (m) => m.reading.id],
  ["at", "timestamptz", (m) => m.reading.atMicros ?? m.reading.at.getTime() * 1000],
  ["device_id", "uuid", (m) => m.reading.deviceId],
  ["channel_index", "int2", (m) => m.reading.channel],
  ["channel_id", "uuid", (m) => m.channel?.id ?? null],
  ["asset_id", "uuid", (m) => m.channel?.asset?.id ?? null],
  ["status", "text", (m) => m.status],
  ["status_detail", "text", (m) => m.statusDetail],
  ["tof_us", "float8", (m) => m.tofUs],
  ["burst_n", "int2", (m) => m.burstN],
  ["spread_us", "float8", (m) => m.spreadUs],
  ["air_temp_c", "float8", (m) => m.airTempC],
  ["temp_source", "text", (m) => m.tempSource],
  ["speed_of_sound_ms", "float8", (m) => m.speedOfSoundMs],
  ["sound_model", "text", (m) => m.soundModel],
  ["raw_distance_m", "float8", (m) => m.rawDistanceM],
  ["distance_m", "float8", (m) => m.distanceM],
  ["level_m", "float8", (m) => m.levelM],
  ["volume_l", "float8", (m) => m.volumeL],
  ["fill_pct", "float8", (m) => m.fillPct],
  ["ullage_l", "float8", (m) => m.ullageL],
  ["occupied", "bool", (m) => m.occupied],
  ["uncertainty_m", "float8", (m) => m.uncertaintyM],
];

const SQL_TYPE: Record<BinaryType | "text", string> = { float8: "float8", int8: "bigint", int2: "smallint", bool: "boolean", uuid: "uuid", timestamptz: "timestamptz", text: "text" };

const SUMMED = ["distance", "level", "volume", "fill", "air_temp"] as const;
const SOURCE_COLUMN: Record<(typeof SUMMED)[number], string> = { distance: "distance_m", level: "level_m", volume: "volume_l", fill: "fill_pct", air_temp: "air_temp_c" };

// Sums add up; a side with no values (null) leaves the other side's sum.
const addNullable = (c: string) => `${c} = CASE WHEN r.${c} IS NULL THEN excluded.${c} WHEN excluded.${c} IS NULL THEN r.${c} ELSE r.${c} + excluded.${c} END`;

const INSERT_MEASUREMENTS_SQL = `
  WITH ins AS (
    INSERT INTO measurements (${MEASUREMENT_COLUMNS.map(([n]) => n).join(", ")})
    SELECT * FROM unnest(${MEASUREMENT_COLUMNS.map(([, t], i) => `$${i + 1}::${SQL_TYPE[t]}[]`).join(", ")})
    ON CONFLICT (reading_id, at) DO NOTHING
    RETURNING asset_id, channel_id, at, status, distance_m, level_m, volume_l, fill_pct, air_temp_c, uncertainty_m, occupied
  ), agg AS (
    SELECT asset_id, channel_id, b.s AS bucket_s, date_bin(make_interval(secs => b.s), at, timestamptz '2000-01-01 00:00:00+00') AS bucket_start,
      count(*) AS n_all,
      count(*) FILTER (WHERE status = 'ok') AS n,
      ${SUMMED.map((k) => `sum(${SOURCE_COLUMN[k]}) FILTER (WHERE status = 'ok') AS ${k}_sum, min(${SOURCE_COLUMN[k]}) FILTER (WHERE status = 'ok') AS ${k}_min, max(${SOURCE_COLUMN[k]}) FILTER (WHERE status = 'ok') AS ${k}_max`).join(",\n      ")},
      count(air_temp_c) FILTER (WHERE status = 'ok') AS air_temp_n,
      sum(uncertainty_m) FILTER (WHERE status = 'ok') AS uncertainty_sum,
      count(*) FILTER (WHERE status = 'ok' AND occupied) AS occupied_n
    FROM ins CROSS JOIN (VALUES (300), (3600)) AS b(s)
    WHERE asset_id IS NOT NULL AND channel_id IS NOT NULL
    GROUP BY 1, 2, 3, 4
  ), up AS (
    INSERT INTO measurement_rollups AS r (asset_id, channel_id, bucket_s, bucket_start, n_all, n,
      ${SUMMED.map((k) => `${k}_sum, ${k}_min, ${k}_max`).join(", ")}, air_temp_n, uncertainty_sum, occupied_n)
    SELECT asset_id, channel_id, bucket_s, bucket_start, n_all, n,
      ${SUMMED.map((k) => `${k}_sum, ${k}_min, ${k}_max`).join(", ")}, air_temp_n, uncertainty_sum, occupied_n
    FROM agg
    ON CONFLICT (asset_id, bucket_s, bucket_start, channel_id) DO UPDATE SET
      n_all = r.n_all + excluded.n_all,
      n = r.n + excluded.n,
      ${SUMMED.map((k) => `${addNullable(`${k}_sum`)}, ${k}_min = least(r.${k}_min, excluded.${k}_min), ${k}_max = greatest(r.${k}_max, excluded.${k}_max)`).join(",\n      ")},
      air_temp_n = r.air_temp_n + excluded.air_temp_n,
      ${addNullable("uncertainty_sum")},
      occupied_n = r.occupied_n + excluded.occupied_n
    RETURNING 1
  )
  SELECT (SELECT count(*) FROM ins)::int AS inserted, (SELECT count(*) FROM up)::int AS buckets`;

/** Inserts measurements (a reading already measured is left alone) and folds the new ones into the rollups. */
export async function insertMeasurements(measurements: readonly Measurement[], transaction: Transaction): Promise<{ inserted: number; buckets: number }> {
  if (measurements.length === 0) return { inserted: 0, buckets: 0 };
  const columns = MEASUREMENT_COLUMNS.map(([, type, value]) => {
    const values = measurements.map(value);
    return type === "text" ? arrayLiteral(values, "text") : binaryArray(values, type);
  });
  const [row] = await sqlRows<{ inserted: number; buckets: number }>(INSERT_MEASUREMENTS_SQL, columns, transaction);
  return row;
}

// ── Sessions, temperature samples, flags ────────────────────────────────────────────────────────

export async function upsertSessions(sessions: readonly SessionRow[], transaction: Transaction): Promise<void> {
  if (sessions.length === 0) return;
  await sqlRun(
    `INSERT INTO occupancy_sessions (asset_id, channel_id, started_at, ended_at, duration_s)
     SELECT * FROM unnest($1::uuid[], $2::uuid[], $3::timestamptz[], $4::timestamptz[], $5::float8[])
     ON CONFLICT (channel_id, started_at) DO UPDATE SET ended_at = excluded.ended_at, duration_s = excluded.duration_s`,
    [sessions.map((s) => s.assetId), sessions.map((s) => s.channelId), sessions.map((s) => s.start), sessions.map((s) => s.end), sessions.map((s) => s.durationS)],
    transaction,
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
    transaction,
  );
}

export async function applyFlagChanges(flags: FlagChanges, offlineCleared: readonly { channelId: string; at: Date }[], transaction: Transaction): Promise<void> {
  const clears = [...flags.clears, ...offlineCleared.map((o) => ({ channelId: o.channelId, flag: "offline" as const, at: o.at }))];
  if (clears.length) {
    await sqlRun(
      `UPDATE health_flags f SET cleared_at = greatest(f.since, v.at), updated_at = now()
       FROM unnest($1::uuid[], $2::text[], $3::timestamptz[]) AS v(channel_id, flag, at)
       WHERE f.channel_id = v.channel_id AND f.flag = v.flag AND f.cleared_at IS NULL`,
      [clears.map((c) => c.channelId), clears.map((c) => c.flag), clears.map((c) => c.at)],
      transaction,
    );
  }
  if (flags.intervals.length) {
    const f = flags.intervals;
    await sqlRun(
      `INSERT INTO health_flags (channel_id, flag, since, cleared_at, magnitude, details)
       SELECT * FROM unnest($1::uuid[], $2::text[], $3::timestamptz[], $4::timestamptz[], $5::float8[], $6::jsonb[])`,
      [f.map((x) => x.channelId), f.map((x) => x.flag), f.map((x) => x.since), f.map((x) => x.clearedAt), f.map((x) => x.magnitude), f.map((x) => JSON.stringify(x.details))],
      transaction,
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
      transaction,
    );
  }
}

/** Everything a processed batch writes, in one transaction. */
export async function writeProcessedBatch(batch: ProcessedBatch, transaction: Transaction): Promise<{ inserted: number; buckets: number }> {
  await insertTemperatureSamples(batch.newTemperatureSamples, transaction);
  const written = await insertMeasurements(batch.measurements, transaction);
  await upsertSessions(batch.sessions, transaction);
  await applyFlagChanges(batch.flags, batch.offlineCleared, transaction);
  await saveChannelStates(batch.states, new Set(batch.offlineCleared.map((o) => o.channelId)), transaction);
  return written;
}
