// The worker benchmark's anchor: the worker's arithmetic as ONE set-based INSERT … SELECT into a table
// shaped like `measurements`, so the worker's drain rate can be read against what PostgreSQL alone
// does with the same readings. Only what a statement can do row by row: time of flight (echo, burst
// median, capture ticks), c(T) = 331.3·√(1 + T/273.15) (REFERENCES.md §1, the worker's dry-air model;
// the bench's sites give no humidity) with the reading's own or the site's temperature, distance
// c·t/2 through calibration and face offset, range checks, a tank's level, a flat-bottom vertical
// cylinder's volume (π·r²·h, clamped to the tank), fill and ullage, a bay's occupancy by a plain
// threshold. Not in it: uncertainty, the Hampel filter, burst spread, the bay's hysteresis and
// debounce, rollups, channel states, flags — the worker does those as well.
import type pg from "pg";

// Logged, like `measurements`: the worker's batches are logged too (only their commits are
// asynchronous), so an unlogged anchor would be faster for a reason the worker cannot use.
const CREATE = `CREATE TABLE anchor_measurements (LIKE measurements INCLUDING DEFAULTS INCLUDING CONSTRAINTS INCLUDING INDEXES)`;

// Settings from lib/worker/compute/settings.ts (defaultTempC 20 °C, outOfBoundsToleranceM 0.02 m) and
// the temperature plausibility check of lib/worker/compute/air-temperature.ts are not repeated: the
// bench's temperatures are all plausible and its tanks have no uncertainty-widened tolerance case.
const INSERT = `
  INSERT INTO anchor_measurements (reading_id, at, device_id, channel_index, channel_id, asset_id, status, tof_us, burst_n,
    air_temp_c, temp_source, speed_of_sound_ms, sound_model, raw_distance_m, distance_m, level_m, volume_l, fill_pct, ullage_l, occupied)
  SELECT r.id, r.at, r.device_id, r.channel, c.id, a.id,
         CASE WHEN d.distance_m > c.max_range_m THEN 'no_echo'
              WHEN d.distance_m < c.min_range_m THEN 'too_close'
              WHEN a.kind = 'tank' AND (l.level_m < -0.02 OR l.level_m > l.height_m + 0.02) THEN 'out_of_bounds'
              ELSE 'ok' END,
         t.tof_us, t.burst_n, t.temp_c, t.temp_source, v.c_ms, 'dry', w.raw_m, d.distance_m,
         l.level_m, l.volume_l, 100 * l.volume_l / a.capacity_l, a.capacity_l - l.volume_l,
         CASE WHEN a.kind = 'bay' AND d.distance_m <= c.max_range_m AND d.distance_m >= c.min_range_m THEN d.distance_m < a.occupied_below_m END
  FROM readings r
  JOIN channels c ON c.device_id = r.device_id AND c.index = r.channel
  JOIN devices dv ON dv.id = r.device_id
  JOIN sites s ON s.id = dv.site_id
  LEFT JOIN assets a ON a.id = c.asset_id
  CROSS JOIN LATERAL (
    SELECT CASE WHEN r.samples_us IS NOT NULL THEN (SELECT percentile_cont(0.5) WITHIN GROUP (ORDER BY x) FROM unnest(r.samples_us) x)
                WHEN dv.profile = 'capture' AND r.ticks IS NOT NULL
                  THEN ((coalesce(r.overflows, 0) * 2 ^ dv.timer_bits + r.ticks) * dv.prescaler * 1e6) / dv.clock_hz
                ELSE r.echo_us END AS tof_us,
           cardinality(r.samples_us) AS burst_n,
           coalesce(r.air_temp_c, s.air_temp_c, 20) AS temp_c,
           CASE WHEN r.air_temp_c IS NOT NULL THEN 'reading' WHEN s.air_temp_c IS NOT NULL THEN 'site_fixed' ELSE 'default' END AS temp_source
  ) t
  CROSS JOIN LATERAL (SELECT 331.3 * sqrt(1 + t.temp_c / 273.15) AS c_ms) v
  CROSS JOIN LATERAL (SELECT (v.c_ms * t.tof_us * 1e-6) / 2 AS raw_m) w
  CROSS JOIN LATERAL (SELECT (c.calibration_scale * w.raw_m + c.calibration_offset_m) - c.face_offset_m AS distance_m) d
  LEFT JOIN LATERAL (
    SELECT a.mount_height_m - d.distance_m AS level_m, (a.geometry->>'height_m')::float8 AS height_m,
           pi() * ((a.geometry->>'diameter_m')::float8 / 2) ^ 2
             * greatest(0, least(a.mount_height_m - d.distance_m, (a.geometry->>'height_m')::float8)) * 1000 AS volume_l
    WHERE a.kind = 'tank' AND a.geometry->>'shape' = 'vertical_cylinder' AND a.geometry->>'bottom' = 'flat'
      AND d.distance_m BETWEEN c.min_range_m AND c.max_range_m
  ) l0 ON true
  CROSS JOIN LATERAL (SELECT l0.level_m, l0.height_m, CASE WHEN l0.level_m BETWEEN -0.02 AND l0.height_m + 0.02 THEN l0.volume_l END AS volume_l) l`;

export interface AnchorResult {
  rows: number;
  seconds: number;
}

/** Runs the anchor statement once, with the worker's session settings (asynchronous commit, no JIT). */
export async function runAnchor(c: pg.Client): Promise<AnchorResult> {
  await c.query(CREATE);
  await c.query(`CHECKPOINT`);
  await c.query(`BEGIN`);
  await c.query(`SET LOCAL synchronous_commit = off; SET LOCAL jit = off`);
  const started = process.hrtime.bigint();
  const result = await c.query(INSERT);
  await c.query(`COMMIT`);
  const seconds = Number(process.hrtime.bigint() - started) / 1e9;
  return { rows: result.rowCount ?? 0, seconds };
}

export interface AnchorCheck {
  compared: number;
  maxDistanceDiffM: number;
  maxLevelDiffM: number;
  maxVolumeDiffL: number;
  statusAgreePct: number;
  bayCompared: number;
  occupiedAgreePct: number;
}

/**
 * The anchor against the worker's own measurements of the same readings: both must compute the same
 * distance (to within a micrometre), level and volume. Statuses the anchor cannot give (suspect from
 * the Hampel filter, noisy bursts) and the bays' debounced occupancy are counted, not required.
 */
export async function checkAnchor(c: pg.Client): Promise<AnchorCheck> {
  const { rows } = await c.query(`
    SELECT count(*) FILTER (WHERE m.distance_m IS NOT NULL AND x.distance_m IS NOT NULL) AS compared,
           coalesce(max(abs(m.distance_m - x.distance_m)), 0) AS max_distance,
           coalesce(max(abs(m.level_m - x.level_m)), 0) AS max_level,
           coalesce(max(abs(m.volume_l - x.volume_l)) FILTER (WHERE m.status = 'ok' AND x.status = 'ok'), 0) AS max_volume,
           100.0 * count(*) FILTER (WHERE m.status = x.status OR (m.status IN ('suspect', 'noisy') AND x.status = 'ok')) / greatest(count(*), 1) AS status_agree,
           count(*) FILTER (WHERE m.occupied IS NOT NULL AND x.occupied IS NOT NULL) AS bays,
           100.0 * count(*) FILTER (WHERE m.occupied = x.occupied) / greatest(count(*) FILTER (WHERE m.occupied IS NOT NULL AND x.occupied IS NOT NULL), 1) AS occupied_agree,
           count(*) AS total, (SELECT count(*) FROM measurements) AS worker_rows
    FROM measurements m JOIN anchor_measurements x ON x.reading_id = m.reading_id AND x.at = m.at`);
  const r = rows[0];
  if (Number(r.total) !== Number(r.worker_rows)) throw new Error(`anchor matched ${r.total} of the worker's ${r.worker_rows} measurements`);
  return {
    compared: Number(r.compared),
    maxDistanceDiffM: Number(r.max_distance),
    maxLevelDiffM: Number(r.max_level),
    maxVolumeDiffL: Number(r.max_volume),
    statusAgreePct: Number(r.status_agree),
    bayCompared: Number(r.bays),
    occupiedAgreePct: Number(r.occupied_agree),
  };
}
