// Late temperature samples: a site's temperature channel can deliver its readings after the site's
// other channels delivered theirs for the same times (a unit that uploads its history later, a batch
// measured just before the one holding the samples). Those measurements fell back to the site's fixed
// value or 20 °C and would stay so. After each drain of the queue this stage looks at the spans of
// samples stored since the last check (noted by a trigger, migration 0007) and files a recompute for
// every channel whose measurements around them fell back although a sample now applies by the rules
// of lib/worker/compute/air-temperature.ts, in one set-based statement. When no samples were stored since
// the last cycle, the stage is one look at an empty table.

import { PIPELINE_SETTINGS } from "./compute/settings";
import { getSequelize } from "../db/sequelize";
import { sqlRows } from "../db/sql";

/** Reason of the recompute requests this stage files. */
export const LATE_TEMPERATURE_REASON = "late temperature samples";

/**
 * Each span is checked twice: right after the samples are stored, and again this long after that
 * first check, for measurements of another worker's batch that was computed without the samples and
 * committed after the first check. The second check finds nothing once the first one's recompute ran.
 */
const RECHECK_AFTER_S = 300;
const MAX_SPANS = 1000;

// The spans due for a check: the first check marks a span, the second deletes it.
const CLAIM_SPANS = `
WITH due AS (
  SELECT id FROM temperature_sample_spans
  WHERE checked_at IS NULL OR checked_at <= now() - make_interval(secs => $2)
  ORDER BY id LIMIT $1 FOR UPDATE SKIP LOCKED
), first_check AS (
  UPDATE temperature_sample_spans s SET checked_at = now() FROM due
  WHERE s.id = due.id AND s.checked_at IS NULL
  RETURNING s.site_id, s.from_at, s.to_at
), second_check AS (
  DELETE FROM temperature_sample_spans s USING due
  WHERE s.id = due.id AND s.checked_at IS NOT NULL
  RETURNING s.site_id, s.from_at, s.to_at
)
SELECT * FROM first_check UNION ALL SELECT * FROM second_check`;

// A new sample at t can give a temperature to a measurement at x (PIPELINE_SETTINGS, air-temperature.ts):
// as the nearest sample, within tempNearestMaxS of x; or as a neighbour to interpolate between, when no
// sample lies between t and x and the pair is at most tempInterpolationMaxGapS apart. So the window of a
// span [from, to] reaches back to the earlier of from − nearest and (the previous sample, but no further
// than from − gap), and forward likewise. Measurement times are cut to milliseconds, as the worker's are.
const FILE_RECOMPUTES = `
WITH spans AS (
  SELECT * FROM unnest($1::uuid[], $2::timestamptz[], $3::timestamptz[]) AS s(site_id, from_at, to_at)
), windows AS (
  SELECT sp.site_id,
         least(sp.from_at - make_interval(secs => $5), greatest(sp.from_at - make_interval(secs => $4), prev.at)) AS from_at,
         greatest(sp.to_at + make_interval(secs => $5), least(sp.to_at + make_interval(secs => $4), next.at)) AS to_at
  FROM spans sp
  CROSS JOIN LATERAL (SELECT max(t.at) AS at FROM temperature_samples t WHERE t.site_id = sp.site_id AND t.at < sp.from_at) prev
  CROSS JOIN LATERAL (SELECT min(t.at) AS at FROM temperature_samples t WHERE t.site_id = sp.site_id AND t.at > sp.to_at) next
), late AS (
  SELECT DISTINCT c.id
  FROM windows w
  JOIN devices d ON d.site_id = w.site_id
  JOIN channels c ON c.device_id = d.id AND c.asset_id IS NOT NULL
  WHERE EXISTS (
      SELECT 1
      FROM measurements m
      CROSS JOIN LATERAL (SELECT date_trunc('milliseconds', m.at) AS at) x
      CROSS JOIN LATERAL (SELECT max(t.at) AS at FROM temperature_samples t WHERE t.site_id = w.site_id AND t.at < x.at) earlier
      CROSS JOIN LATERAL (SELECT min(t.at) AS at FROM temperature_samples t WHERE t.site_id = w.site_id AND t.at >= x.at) later
      -- Only the measurements a recompute rebuilds: those of the channel's present asset.
      WHERE m.channel_id = c.id AND m.asset_id = c.asset_id AND m.at BETWEEN w.from_at AND w.to_at
        AND m.temp_source IN ('site_fixed', 'default')
        AND (later.at = x.at
             OR later.at - earlier.at <= make_interval(secs => $4)
             OR x.at - earlier.at <= make_interval(secs => $5)
             OR later.at - x.at <= make_interval(secs => $5)))
    -- A request not yet started rebuilds the channel with the samples anyway.
    AND NOT EXISTS (
      SELECT 1 FROM recompute_requests r
      WHERE r.done_at IS NULL AND r.started_at IS NULL AND (r.channel_id = c.id OR r.asset_id = c.asset_id))
)
INSERT INTO recompute_requests (channel_id, reason)
SELECT id, $6 FROM late ORDER BY id
RETURNING channel_id`;

/** Files a recompute for each channel measured without the temperature samples that now cover it; returns how many. */
export async function fileLateTemperatureRecomputes(): Promise<number> {
  return getSequelize().transaction(async (transaction) => {
    const spans = await sqlRows<{ site_id: string; from_at: Date; to_at: Date }>(CLAIM_SPANS, [MAX_SPANS, RECHECK_AFTER_S], { transaction });
    if (spans.length === 0) return 0;
    const filed = await sqlRows<{ channel_id: string }>(
      FILE_RECOMPUTES,
      [
        spans.map((s) => s.site_id),
        spans.map((s) => s.from_at),
        spans.map((s) => s.to_at),
        PIPELINE_SETTINGS.tempInterpolationMaxGapS,
        PIPELINE_SETTINGS.tempNearestMaxS,
        LATE_TEMPERATURE_REASON,
      ],
      { transaction },
    );
    return filed.length;
  });
}
