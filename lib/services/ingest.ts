import { QUEUE_INSERTED, RETURNING_QUEUED_COLUMNS } from "../worker/reading-queue";
import { sqlRows } from "../db/sql";

import type { SignalProfile } from "../validations/device";
import type { ReadingInput } from "../validations/reading";

export interface KeyedDevice {
  id: string;
  profile: SignalProfile;
  timer_bits: number | null;
  key_hash: Buffer;
  channels: number[];
}

/** The device behind a key prefix, when the key is live; the caller compares the hash in constant time. */
export async function findDeviceByKeyPrefix(prefix: string): Promise<KeyedDevice | null> {
  // Named (prepared) statements: the ingest path runs the same two for every request, and PostgreSQL
  // parses and plans each once per connection. The key look-up reads the primary: a device whose key
  // was just issued or revoked must be seen so at once.
  const rows = await sqlRows<KeyedDevice>(
    `SELECT d.id, d.profile, d.timer_bits, k.key_hash,
            coalesce((SELECT array_agg(c.index ORDER BY c.index) FROM channels c WHERE c.device_id = d.id), '{}') AS channels
       FROM device_keys k JOIN devices d ON d.id = k.device_id
      WHERE k.prefix = $1 AND k.revoked_at IS NULL`,
    [prefix],
    { name: "halftrip_device_by_key_prefix", primary: true },
  );
  return rows[0] ?? null;
}

export interface StoreResult {
  limited: boolean;
  retryAfterS: number;
  accepted: number;
}

/**
 * One statement per batch: counts the request against the device's per-minute limit, and only when it is
 * within the limit inserts the new readings (a resent (channel, seq) is skipped by reading_keys), queues
 * them for the worker and wakes it (NOTIFY readings, delivered at commit; the worker LISTENs). Last seen,
 * battery and signal are recorded once a batch (a limited request was still a sign of life).
 */
export async function storeReadings(deviceId: string, readings: ReadingInput[], serverTime: Date): Promise<StoreResult> {
  const battery = [...readings].reverse().find((r) => r.battery_v !== undefined)?.battery_v ?? null;
  const rssi = [...readings].reverse().find((r) => r.rssi_dbm !== undefined)?.rssi_dbm ?? null;
  const rows = readings.map((r) => ({
    channel: r.channel,
    seq: r.seq,
    at: r.at ?? serverTime.toISOString(),
    echo_us: r.echo_us ?? null,
    ticks: r.ticks ?? null,
    overflows: r.overflows ?? null,
    samples_us: r.samples_us ?? null,
    pulse_us: r.pulse_us ?? null,
    high_us: r.high_us ?? null,
    period_us: r.period_us ?? null,
    air_temp_c: r.air_temp_c ?? null,
    battery_v: r.battery_v ?? null,
    rssi_dbm: r.rssi_dbm ?? null,
  }));
  const [result] = await sqlRows<{ rate_count: number; max_requests_per_min: number; window_left_s: number; accepted: string }>(
    `WITH rl AS (
       UPDATE devices SET
         rate_window_start = CASE WHEN rate_window_start IS NULL OR rate_window_start <= now() - interval '1 minute' THEN now() ELSE rate_window_start END,
         rate_count = CASE WHEN rate_window_start IS NULL OR rate_window_start <= now() - interval '1 minute' THEN 1 ELSE rate_count + 1 END,
         last_seen_at = $3, battery_v = coalesce($4, battery_v), rssi_dbm = coalesce($5, rssi_dbm)
       WHERE id = $1
       RETURNING rate_count, max_requests_per_min,
                 ceil(extract(epoch FROM (rate_window_start + interval '1 minute' - now())))::int AS window_left_s
     ),
     allowed AS (SELECT 1 FROM rl WHERE rate_count <= max_requests_per_min),
     input AS (
       SELECT * FROM jsonb_to_recordset($2::jsonb) AS r(
         channel smallint, seq bigint, at timestamptz, echo_us double precision, ticks bigint, overflows integer,
         samples_us double precision[], pulse_us double precision, high_us double precision, period_us double precision,
         air_temp_c double precision, battery_v double precision, rssi_dbm double precision)
       WHERE EXISTS (SELECT 1 FROM allowed)
     ),
     fresh AS (
       INSERT INTO reading_keys (device_id, channel, seq)
       SELECT $1, channel, seq FROM input
       ON CONFLICT DO NOTHING
       RETURNING channel, seq
     ),
     inserted AS (
       INSERT INTO readings (device_id, channel, seq, at, received_at, echo_us, ticks, overflows, samples_us, pulse_us, high_us, period_us, air_temp_c, battery_v, rssi_dbm)
       SELECT $1, i.channel, i.seq, i.at, $3, i.echo_us, i.ticks, i.overflows, i.samples_us, i.pulse_us, i.high_us, i.period_us, i.air_temp_c, i.battery_v, i.rssi_dbm
         FROM input i JOIN fresh f ON f.channel = i.channel AND f.seq = i.seq
       ${RETURNING_QUEUED_COLUMNS}
     ),
     ${QUEUE_INSERTED}
     SELECT rl.rate_count, rl.max_requests_per_min, rl.window_left_s, q.accepted,
            CASE WHEN q.accepted > 0 THEN pg_notify('readings', '') END AS woke
       FROM rl, (SELECT count(*) AS accepted FROM queued) q`,
    [deviceId, JSON.stringify(rows), serverTime.toISOString(), battery, rssi],
    { name: "halftrip_store_readings" },
  );
  if (!result) return { limited: false, retryAfterS: 0, accepted: 0 };
  const limited = result.rate_count > result.max_requests_per_min;
  return { limited, retryAfterS: Math.max(1, result.window_left_s), accepted: Number(result.accepted) };
}
