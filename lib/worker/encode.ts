// What a batch writes besides its small side tables: measurements, their 5-minute and hourly rollups
// and the channels' states. The columns are encoded as binary arrays as soon as the batch is computed
// (while the database is still busy with the batch before it), and written in one statement: the
// writes then wait neither for each other nor for the worker's other work between round trips.

import type { Transaction } from "sequelize";
import { binaryArray, binaryColumn, ColumnWriter, decodeBase64Row, decodeBinaryArray, sendArray, type BinaryType } from "./binary-arrays";
import type { ChannelState } from "./compute/channel-state";
import type { ProcessedBatch } from "./compute/batch";
import type { ChannelConfig, Measurement } from "./compute/types";
import { applyFlagChanges, exactMicros, insertTemperatureSamples, upsertLatestValues, upsertSessions, type SubMillis } from "./batch-store";
import { sqlRows, sqlRun } from "../db/sql";

// ── Measurements and rollups ────────────────────────────────────────────────────────────────────

// The measurement columns as sent, in the order encodeMeasurements writes them. Device, channel and
// asset ids repeat thousands of times a batch: they go once each in three dictionaries that follow
// these columns, and the rows name them by position (1-based, as PostgreSQL subscripts count).
export const SENT_COLUMNS: [name: string, type: BinaryType][] = [
  ["reading_id", "int8"],
  ["at", "timestamptz"],
  ["device_n", "int4"],
  ["channel_index", "int2"],
  ["channel_n", "int4"],
  ["status", "text"],
  ["status_detail", "text"],
  ["tof_us", "float8"],
  ["burst_n", "int2"],
  ["spread_us", "float8"],
  ["air_temp_c", "float8"],
  ["temp_source", "text"],
  ["speed_of_sound_ms", "float8"],
  ["sound_model", "text"],
  ["raw_distance_m", "float8"],
  ["distance_m", "float8"],
  ["level_m", "float8"],
  ["volume_l", "float8"],
  ["fill_pct", "float8"],
  ["ullage_l", "float8"],
  ["occupied", "bool"],
  ["uncertainty_m", "float8"],
];
const DICTIONARIES = 3;

/** The measurement columns as binary arrays (SENT_COLUMNS, then the device, channel and asset dictionaries), in one pass over the records. */
export function encodeMeasurements(ms: readonly Measurement[], subMillis: SubMillis): Buffer[] {
  const n = ms.length;
  const float = () => new ColumnWriter("float8", n);
  const readingId = new ColumnWriter("int8", n);
  const at = new ColumnWriter("timestamptz", n);
  const deviceN = new ColumnWriter("int4", n);
  const channelIndex = new ColumnWriter("int2", n);
  const channelN = new ColumnWriter("int4", n);
  const burstN = new ColumnWriter("int2", n);
  const occupied = new ColumnWriter("bool", n);
  const [tof, spread, airTemp, speed, rawDistance, distance, level, volume, fill, ullage, uncertainty] = Array.from({ length: 11 }, float);
  const status = new Array<string>(n);
  const statusDetail = new Array<string | null>(n);
  const tempSource = new Array<string | null>(n);
  const soundModel = new Array<string | null>(n);
  const deviceNumber = new Map<string, number>();
  const channelNumber = new Map<ChannelConfig, number>();
  for (let i = 0; i < n; i++) {
    const m = ms[i];
    const r = m.reading;
    readingId.int8(r.id);
    at.timestamptz(exactMicros(r, subMillis));
    let d = deviceNumber.get(r.deviceId);
    if (d === undefined) deviceNumber.set(r.deviceId, (d = deviceNumber.size + 1));
    deviceN.int4(d);
    channelIndex.int2(r.channel);
    if (m.channel) {
      let c = channelNumber.get(m.channel);
      if (c === undefined) channelNumber.set(m.channel, (c = channelNumber.size + 1));
      channelN.int4(c);
    } else channelN.null();
    status[i] = m.status;
    statusDetail[i] = m.statusDetail;
    tof.float8(m.tofUs);
    burstN.int2(m.burstN);
    spread.float8(m.spreadUs);
    airTemp.float8(m.airTempC);
    tempSource[i] = m.tempSource;
    speed.float8(m.speedOfSoundMs);
    soundModel[i] = m.soundModel;
    rawDistance.float8(m.rawDistanceM);
    distance.float8(m.distanceM);
    level.float8(m.levelM);
    volume.float8(m.volumeL);
    fill.float8(m.fillPct);
    ullage.float8(m.ullageL);
    occupied.bool(m.occupied);
    uncertainty.float8(m.uncertaintyM);
  }
  const channels = [...channelNumber.keys()];
  return [
    readingId.finish(),
    at.finish(),
    deviceN.finish(),
    channelIndex.finish(),
    channelN.finish(),
    binaryArray(status, "text"),
    binaryArray(statusDetail, "text"),
    tof.finish(),
    burstN.finish(),
    spread.finish(),
    airTemp.finish(),
    binaryArray(tempSource, "text"),
    speed.finish(),
    binaryArray(soundModel, "text"),
    rawDistance.finish(),
    distance.finish(),
    level.finish(),
    volume.finish(),
    fill.finish(),
    ullage.finish(),
    occupied.finish(),
    uncertainty.finish(),
    binaryArray([...deviceNumber.keys()], "uuid"),
    binaryArray(channels.map((c) => c.id), "uuid"),
    binaryArray(channels.map((c) => c.asset?.id ?? null), "uuid"),
  ];
}

const SQL_TYPE: Record<BinaryType, string> = { float8: "float8", int8: "bigint", int4: "integer", int2: "smallint", bool: "boolean", uuid: "uuid", timestamptz: "timestamptz", text: "text", bytea: "bytea" };

/**
 * The rows of parameter arrays, one column per array, as a subquery named `alias`. The arrays are
 * unnested in the select list, which streams the rows: unnest(a, b, …) in FROM first copies them all
 * into a tuple store (on disk past work_mem), which cost a batch's measurement insert about a fifth.
 */
const unnestedRows = (columns: readonly (readonly [string, BinaryType, ...unknown[]])[], alias: string, first = 1) =>
  `(SELECT ${columns.map(([n, t], i) => `unnest($${i + first}::${SQL_TYPE[t]}[]) AS ${n}`).join(", ")}) AS ${alias}`;

// Millisecond order, then id: the order the computing stages gave each channel's measurements.
const atMsOf = (m: Measurement) => m.reading.at.getTime();

/** Each channel's measurements consecutive and in time order: how processBatch leaves them. */
function inChannelRuns(measurements: readonly Measurement[]): boolean {
  const seen = new Set<string>();
  for (let i = 0; i < measurements.length; i++) {
    const key = measurements[i].channel?.id ?? "";
    const previous = i > 0 ? measurements[i - 1] : null;
    if (previous && (previous.channel?.id ?? "") === key) {
      if (atMsOf(previous) > atMsOf(measurements[i]) || (atMsOf(previous) === atMsOf(measurements[i]) && previous.reading.id > measurements[i].reading.id)) return false;
      continue;
    }
    if (seen.has(key)) return false;
    seen.add(key);
  }
  return true;
}

/**
 * A channel's measurements together, in time order: the rows of one channel share index pages and
 * heap pages, which makes the insert about a third cheaper and later reads of a channel's history
 * touch fewer pages, and the rollups rely on it (a bucket's measurements are consecutive).
 */
function inChannelOrder(measurements: readonly Measurement[]): Measurement[] {
  if (inChannelRuns(measurements)) return measurements.slice();
  const groups = new Map<string, Measurement[]>();
  for (const m of measurements) {
    const key = m.channel?.id ?? "";
    const group = groups.get(key);
    if (group) group.push(m);
    else groups.set(key, [m]);
  }
  const out: Measurement[] = [];
  for (const group of groups.values()) {
    group.sort((a, b) => atMsOf(a) - atMsOf(b) || a.reading.id - b.reading.id);
    for (const m of group) out.push(m);
  }
  return out;
}

function isUniqueViolation(err: unknown): boolean {
  const e = err as { code?: string; original?: { code?: string }; parent?: { code?: string } };
  return (e?.original?.code ?? e?.parent?.code ?? e?.code) === "23505";
}

/** One bucket of a channel's measurements, as measurement_rollups keeps it: sums and counts cover status 'ok'. */
export interface Rollup {
  assetId: string;
  channelId: string;
  bucketS: number;
  startMicros: number;
  nAll: number;
  n: number;
  sum: (number | null)[];
  min: (number | null)[];
  max: (number | null)[];
  airTempN: number;
  uncertaintySum: number | null;
  occupiedN: number;
}

const ROLLUP_BUCKETS_S = [300, 3600] as const;
const SUMMED = ["distance", "level", "volume", "fill", "air_temp"] as const;

/** Adds a value to the bucket's k-th sum, minimum and maximum (in SUMMED order); null and non-finite values are left out. */
function addTo(b: Rollup, k: number, v: number | null): void {
  if (v === null || !Number.isFinite(v)) return;
  b.sum[k] = (b.sum[k] ?? 0) + v;
  b.min[k] = b.min[k] === null ? v : Math.min(b.min[k]!, v);
  b.max[k] = b.max[k] === null ? v : Math.max(b.max[k]!, v);
}


/**
 * The 5-minute and hourly buckets of measurements of a channel serving an asset, from measurements in
 * channel order (each channel's in time order, as inChannelOrder leaves them), so a bucket's
 * measurements are consecutive. Buckets start at multiples of their length from 2000-01-01 00:00 UTC
 * (the rollups' `date_bin` origin), which are multiples from 1970 too.
 */
export function rollUp(measurements: readonly Measurement[]): Rollup[] {
  const out: Rollup[] = [];
  const open: (Rollup | null)[] = ROLLUP_BUCKETS_S.map(() => null);
  for (const m of measurements) {
    const channelId = m.channel?.id;
    const assetId = m.channel?.asset?.id;
    if (!channelId || !assetId) continue;
    // Buckets are whole seconds long, so the reading's millisecond time places it exactly.
    const micros = m.reading.at.getTime() * 1000;
    const ok = m.status === "ok";
    for (let s = 0; s < ROLLUP_BUCKETS_S.length; s++) {
      const bucketS = ROLLUP_BUCKETS_S[s];
      const length = bucketS * 1_000_000;
      const startMicros = Math.floor(micros / length) * length;
      let b = open[s];
      if (!b || b.startMicros !== startMicros || b.channelId !== channelId || b.assetId !== assetId) {
        b = { assetId, channelId, bucketS, startMicros, nAll: 0, n: 0, sum: [null, null, null, null, null], min: [null, null, null, null, null], max: [null, null, null, null, null], airTempN: 0, uncertaintySum: null, occupiedN: 0 };
        open[s] = b;
        out.push(b);
      }
      b.nAll++;
      if (!ok) continue;
      b.n++;
      addTo(b, 0, m.distanceM);
      addTo(b, 1, m.levelM);
      addTo(b, 2, m.volumeL);
      addTo(b, 3, m.fillPct);
      addTo(b, 4, m.airTempC);
      if (m.airTempC !== null && Number.isFinite(m.airTempC)) b.airTempN++;
      if (m.uncertaintyM !== null && Number.isFinite(m.uncertaintyM)) b.uncertaintySum = (b.uncertaintySum ?? 0) + m.uncertaintyM;
      if (m.occupied === true) b.occupiedN++;
    }
  }
  return out;
}

type RollupColumn = [name: string, type: BinaryType, value: (r: Rollup) => unknown];

const ROLLUP_COLUMNS: RollupColumn[] = [
  ["asset_id", "uuid", (r) => r.assetId],
  ["channel_id", "uuid", (r) => r.channelId],
  ["bucket_s", "int4", (r) => r.bucketS],
  ["bucket_start", "timestamptz", (r) => r.startMicros],
  ["n_all", "int4", (r) => r.nAll],
  ["n", "int4", (r) => r.n],
  ...SUMMED.flatMap((k, i): RollupColumn[] => [
    [`${k}_sum`, "float8", (r) => r.sum[i]],
    [`${k}_min`, "float8", (r) => r.min[i]],
    [`${k}_max`, "float8", (r) => r.max[i]],
  ]),
  ["air_temp_n", "int4", (r) => r.airTempN],
  ["uncertainty_sum", "float8", (r) => r.uncertaintySum],
  ["occupied_n", "int4", (r) => r.occupiedN],
];

// Sums add up; a side with no values (null) leaves the other side's sum.
const addNullable = (c: string) => `${c} = CASE WHEN r.${c} IS NULL THEN excluded.${c} WHEN excluded.${c} IS NULL THEN r.${c} ELSE r.${c} + excluded.${c} END`;

const upsertRollupsSql = (first: number) => `
  INSERT INTO measurement_rollups AS r (${ROLLUP_COLUMNS.map(([n]) => n).join(", ")})
  SELECT * FROM ${unnestedRows(ROLLUP_COLUMNS, "u", first)}
  ON CONFLICT (asset_id, bucket_s, bucket_start, channel_id) DO UPDATE SET
    n_all = r.n_all + excluded.n_all,
    n = r.n + excluded.n,
    ${SUMMED.map((k) => `${addNullable(`${k}_sum`)}, ${k}_min = least(r.${k}_min, excluded.${k}_min), ${k}_max = greatest(r.${k}_max, excluded.${k}_max)`).join(",\n    ")},
    air_temp_n = r.air_temp_n + excluded.air_temp_n,
    ${addNullable("uncertainty_sum")},
    occupied_n = r.occupied_n + excluded.occupied_n`;

const MEASUREMENT_PARAMS = SENT_COLUMNS.length + DICTIONARIES;
const dictionary = (k: number) => `$${SENT_COLUMNS.length + k}::uuid[]`;
// Each sent column as the measurement columns it fills, and what fills them.
const storedAs = (n: string) => (n === "device_n" ? ["device_id"] : n === "channel_n" ? ["channel_id", "asset_id"] : [n]);
const filledBy = (n: string) => (n === "device_n" ? [`(${dictionary(1)})[u.device_n]`] : n === "channel_n" ? [`(${dictionary(2)})[u.channel_n]`, `(${dictionary(3)})[u.channel_n]`] : [`u.${n}`]);
const INSERT_MEASUREMENTS = `
  INSERT INTO measurements (${SENT_COLUMNS.flatMap(([n]) => storedAs(n)).join(", ")})
  SELECT ${SENT_COLUMNS.flatMap(([n]) => filledBy(n)).join(", ")}
  FROM ${unnestedRows(SENT_COLUMNS, "u")}`;
const INSERT_NEW_MEASUREMENTS = `WITH ins AS (${INSERT_MEASUREMENTS} ON CONFLICT (reading_id, at) DO NOTHING RETURNING reading_id) SELECT ${sendArray("array_agg(reading_id)")} AS ids FROM ins`;

// The states as columns of binary arrays, each state a JSON text cast to jsonb: json_to_recordset
// spent more on taking one JSON document apart than the update took.
const STATE_COLUMNS: [name: string, type: BinaryType][] = [
  ["channel_id", "uuid"],
  ["state", "text"],
  ["last_at", "timestamptz"],
  ["last_reading_id", "int8"],
  ["clear_offline", "bool"],
];

const updateStatesSql = (first: number) => `
  UPDATE channel_state s SET state = v.state::jsonb, last_at = v.last_at, last_reading_id = v.last_reading_id, last_received_at = now(),
    offline_since = CASE WHEN v.clear_offline THEN NULL ELSE s.offline_since END, version = s.version + 1, updated_at = now()
  FROM ${unnestedRows(STATE_COLUMNS, "v", first)}
  WHERE s.channel_id = v.channel_id`;

const ROLLUPS_FIRST = MEASUREMENT_PARAMS + 1;
const STATES_FIRST = ROLLUPS_FIRST + ROLLUP_COLUMNS.length;
const UPSERT_ROLLUPS = upsertRollupsSql(1);
const UPDATE_STATES = updateStatesSql(1);
const WRITE_ALL = `
  WITH measured AS (${INSERT_MEASUREMENTS}),
       rolled AS (${upsertRollupsSql(ROLLUPS_FIRST)}),
       stated AS (${updateStatesSql(STATES_FIRST)})
  SELECT 1`;

function stateColumns(states: Map<string, ChannelState>, offlineCleared: ReadonlySet<string>): Buffer[] {
  const rows = [...states];
  return [
    binaryArray(rows.map(([id]) => id), "uuid"),
    binaryArray(rows.map(([, state]) => JSON.stringify(state)), "text"),
    binaryArray(rows.map(([, state]) => (state.lastAtMs === null ? null : state.lastAtMs * 1000)), "timestamptz"),
    binaryArray(rows.map(([, state]) => state.lastReadingId), "int8"),
    binaryArray(rows.map(([id]) => offlineCleared.has(id)), "bool"),
  ];
}

/** A processed batch with its big writes encoded, ready to send. */
export interface EncodedBatch {
  batch: ProcessedBatch;
  /** The measurements in channel order, and their columns. */
  ordered: Measurement[];
  subMillis: SubMillis;
  measurementColumns: Buffer[];
  /** Rollup columns of all the measurements (what is written unless some were measured before). */
  rollupColumns: Buffer[];
  buckets: number;
  states: Buffer[];
}

export function encodeBatch(batch: ProcessedBatch, subMillis: SubMillis): EncodedBatch {
  const ordered = inChannelOrder(batch.measurements);
  const rollups = rollUp(ordered);
  return {
    batch,
    ordered,
    subMillis,
    measurementColumns: encodeMeasurements(ordered, subMillis),
    rollupColumns: rollupColumns(rollups),
    buckets: rollups.length,
    states: stateColumns(batch.states, new Set(batch.offlineCleared.map((o) => o.channelId))),
  };
}

const rollupColumns = (rollups: readonly Rollup[]) => ROLLUP_COLUMNS.map(([, type, value]) => binaryColumn(rollups, value, type));

/**
 * Everything a processed batch writes, in its transaction. A reading is normally measured once, so
 * the measurements go in with a plain INSERT, in one statement with their rollups and the states;
 * only when that meets an existing measurement are the new ones found with ON CONFLICT (in a
 * savepoint) and only they rolled up.
 */
export async function writeEncodedBatch(e: EncodedBatch, transaction: Transaction): Promise<{ inserted: number; buckets: number }> {
  const { batch } = e;
  await insertTemperatureSamples(batch.newTemperatureSamples, transaction);
  let written = { inserted: e.ordered.length, buckets: e.buckets };
  if (e.ordered.length) {
    let stored = e.ordered;
    await sqlRun(`SAVEPOINT batch_measurements`, [], { transaction });
    try {
      await sqlRun(WRITE_ALL, [...e.measurementColumns, ...e.rollupColumns, ...e.states], { transaction });
      await sqlRun(`RELEASE SAVEPOINT batch_measurements`, [], { transaction });
    } catch (err) {
      if (!isUniqueViolation(err)) throw err;
      await sqlRun(`ROLLBACK TO SAVEPOINT batch_measurements`, [], { transaction });
      const [row] = await sqlRows<{ ids: string | null }>(INSERT_NEW_MEASUREMENTS, e.measurementColumns, { transaction });
      const ids = new Set(decodeBinaryArray(row ? decodeBase64Row(row).ids : null, "int8"));
      stored = e.ordered.filter((m) => ids.has(m.reading.id));
      const rollups = rollUp(stored);
      if (rollups.length) await sqlRun(UPSERT_ROLLUPS, rollupColumns(rollups), { transaction });
      await sqlRun(UPDATE_STATES, e.states, { transaction });
      written = { inserted: ids.size, buckets: rollups.length };
    }
    await upsertLatestValues(stored, e.subMillis, transaction);
  } else if (batch.states.size) {
    await sqlRun(UPDATE_STATES, e.states, { transaction });
  }
  await upsertSessions(batch.sessions, transaction);
  await applyFlagChanges(batch.flags, batch.offlineCleared, transaction);
  return written;
}

export async function writeProcessedBatch(batch: ProcessedBatch, subMillis: SubMillis, transaction: Transaction): Promise<{ inserted: number; buckets: number }> {
  return writeEncodedBatch(encodeBatch(batch, subMillis), transaction);
}
