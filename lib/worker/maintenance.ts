// The worker's per-cycle chores besides the queue: monthly partitions, the offline check, drift
// against manual dips, and tank forecasts.

import { getSequelize } from "../db/sequelize";
import { detectDrift } from "../signal/cusum";
import { tankCapacity, type TankGeometry } from "../geometry/tank-volume";
import { forecastTank, type TankForecast } from "./compute/forecast";
import { tankPurposeOf, type TankPurpose } from "../forecast/purpose";
import { PIPELINE_SETTINGS } from "./compute/settings";
import { sqlRows, sqlRun } from "../db/sql";

/** Creates this month's and the next two months' partitions of readings and measurements. */
export async function ensurePartitions(): Promise<void> {
  await sqlRun(`SELECT ensure_reading_partitions(date_trunc('month', now())::date, 3)`, []);
  await sqlRun(`SELECT ensure_measurement_partitions(date_trunc('month', now())::date, 3)`, []);
}

/**
 * Flags channels silent for more than 3 expected intervals (PRODUCT.md), dated from the moment the
 * third interval passed after the last reading ARRIVED (a backfill catching up on old measurement
 * times is not silence: lib/alarms/late-history.ts rule 3); their next reading clears it. Run only
 * when the queue is empty, so waiting readings are not mistaken for silence. Channels being worked on right now are skipped.
 */
export async function markOfflineChannels(): Promise<number> {
  return getSequelize().transaction(async (transaction) => {
    await sqlRun(`INSERT INTO channel_state (channel_id) SELECT id FROM channels ON CONFLICT DO NOTHING`, [], { transaction });
    const rows = await sqlRows<{ n: number }>(
      `WITH due AS (
         SELECT s.channel_id, s.last_at, d.expected_interval_s,
                coalesce(s.last_received_at, s.last_at, c.created_at) + make_interval(secs => 3 * d.expected_interval_s) AS since
         FROM channel_state s JOIN channels c ON c.id = s.channel_id JOIN devices d ON d.id = c.device_id
         WHERE s.offline_since IS NULL AND coalesce(s.last_received_at, s.last_at, c.created_at) + make_interval(secs => 3 * d.expected_interval_s) < now()
         FOR UPDATE OF s SKIP LOCKED
       ), marked AS (
         UPDATE channel_state s SET offline_since = due.since, version = s.version + 1 FROM due WHERE s.channel_id = due.channel_id
       ), flagged AS (
         INSERT INTO health_flags (channel_id, flag, since, details)
         SELECT channel_id, 'offline', since, jsonb_build_object('last_seen_at', last_at, 'expected_interval_s', expected_interval_s) FROM due
         ON CONFLICT (channel_id, flag) WHERE cleared_at IS NULL DO NOTHING
         RETURNING 1
       )
       SELECT count(*)::int AS n FROM flagged`,
      [],
      { transaction },
    );
    return rows[0]?.n ?? 0;
  });
}

interface PendingDip {
  id: string;
  asset_id: string;
  at: Date;
  level_m: number;
  channel_id: string | null;
  before_at: Date | null;
  before_level: number | null;
  after_at: Date | null;
  after_level: number | null;
}

/** The sensor's level at a dip's time: interpolated between the measurements either side, or the one there is. */
export function levelAtDip(d: Pick<PendingDip, "at" | "before_at" | "before_level" | "after_at" | "after_level">): number | null {
  const t = d.at.getTime();
  if (d.before_at && d.before_level !== null && d.after_at && d.after_level !== null) {
    const span = d.after_at.getTime() - d.before_at.getTime();
    if (span <= 0) return d.before_level;
    return d.before_level + ((t - d.before_at.getTime()) / span) * (d.after_level - d.before_level);
  }
  return d.before_level ?? d.after_level;
}

// Dips older than this without a measurement near them are closed without a residual.
const DIP_GIVE_UP_S = 24 * 3600;

/**
 * Compares manual dips with the sensor's level at the same time, then charts each tank channel's
 * dip residuals with a CUSUM (lib/signal/cusum detectDrift): a drift flag with onset and size.
 */
export async function evaluateManualDips(): Promise<number> {
  const windowS = PIPELINE_SETTINGS.dipMatchWindowS;
  return getSequelize().transaction(async (transaction) => {
    const pending = await sqlRows<PendingDip>(
      `SELECT d.id, d.asset_id, d.at, d.level_m, c.id AS channel_id, b.at AS before_at, b.level_m AS before_level, a.at AS after_at, a.level_m AS after_level
       FROM manual_dips d
       LEFT JOIN LATERAL (SELECT id FROM channels WHERE asset_id = d.asset_id ORDER BY index LIMIT 1) c ON true
       LEFT JOIN LATERAL (SELECT at, level_m FROM measurements m WHERE m.channel_id = c.id AND m.at <= d.at AND m.at >= d.at - make_interval(secs => $1)
                          AND m.status IN ('ok', 'noisy', 'suspect') AND m.level_m IS NOT NULL ORDER BY m.at DESC LIMIT 1) b ON true
       LEFT JOIN LATERAL (SELECT at, level_m FROM measurements m WHERE m.channel_id = c.id AND m.at > d.at AND m.at <= d.at + make_interval(secs => $1)
                          AND m.status IN ('ok', 'noisy', 'suspect') AND m.level_m IS NOT NULL ORDER BY m.at ASC LIMIT 1) a ON true
       WHERE d.evaluated_at IS NULL AND d.voided_at IS NULL
       ORDER BY d.at LIMIT 500
       FOR UPDATE OF d SKIP LOCKED`,
      [windowS],
      { transaction },
    );
    const now = Date.now();
    const touched = new Set<string>();
    let evaluated = 0;
    for (const dip of pending) {
      const measured = levelAtDip(dip);
      const settled = dip.after_at !== null || now - dip.at.getTime() > windowS * 1000;
      if (measured === null && now - dip.at.getTime() < DIP_GIVE_UP_S * 1000) continue;
      if (measured !== null && !settled) continue;
      await sqlRun(
        `UPDATE manual_dips SET channel_id = $2, measured_level_m = $3, residual_m = $4, evaluated_at = now() WHERE id = $1`,
        [dip.id, dip.channel_id, measured, measured === null ? null : measured - dip.level_m],
        { transaction },
      );
      evaluated += 1;
      if (measured !== null && dip.channel_id) touched.add(dip.channel_id);
    }
    for (const channelId of touched) {
      const dips = await sqlRows<{ at: Date; residual_m: number }>(
        `SELECT at, residual_m FROM (SELECT at, residual_m FROM manual_dips WHERE channel_id = $1 AND residual_m IS NOT NULL AND voided_at IS NULL ORDER BY at DESC LIMIT 50) x ORDER BY at`,
        [channelId],
        { transaction },
      );
      const verdict = detectDrift(
        dips.map((x) => ({ at: x.at, value: x.residual_m })),
        { minSigma: PIPELINE_SETTINGS.dipMinSigmaM, minSamples: PIPELINE_SETTINGS.dipMinSamples },
      );
      if (verdict?.drifting && verdict.onsetAt) {
        await sqlRun(
          `INSERT INTO health_flags (channel_id, flag, since, magnitude, details) VALUES ($1, 'drift', $2, $3, $4::jsonb)
           ON CONFLICT (channel_id, flag) WHERE cleared_at IS NULL DO UPDATE SET magnitude = excluded.magnitude, details = excluded.details, updated_at = now()`,
          [channelId, verdict.onsetAt, verdict.magnitude, JSON.stringify({ reference: "manual_dips", direction: verdict.direction, detected_at: verdict.detectedAt, sigma_m: verdict.sigma, dips: dips.length })],
          { transaction },
        );
      } else if (verdict && !verdict.drifting) {
        await sqlRun(
          `UPDATE health_flags SET cleared_at = greatest(since, $2), updated_at = now() WHERE channel_id = $1 AND flag = 'drift' AND cleared_at IS NULL AND details->>'reference' = 'manual_dips'`,
          [channelId, dips[dips.length - 1].at],
          { transaction },
        );
      }
    }
    return evaluated;
  });
}

// A forecast older than this is refreshed when the tank has new data (at once when the tank was edited:
// its purpose or levels may have changed).
const FORECAST_MAX_AGE_S = 15 * 60;
const FORECAST_TANKS_PER_CYCLE = 500;

interface ForecastTankRow {
  asset_id: string;
  purpose: TankPurpose | null;
  capacity_l: number | null;
  geometry: TankGeometry | null;
  reorder_pct: number | null;
  safe_fill_pct: number | null;
  last_at: Date;
  last_volume_l: number | null;
}

/**
 * Projects the tanks whose forecast is missing or stale, by purpose (projectTank via forecastTank), from
 * hourly rollups, and stores the projections in tank_forecasts: three statements for up to 500 tanks.
 */
export async function refreshForecasts(): Promise<number> {
  const windowS = PIPELINE_SETTINGS.forecastWindowDays * 86400;
  const tanks = await sqlRows<ForecastTankRow>(
    `SELECT a.id AS asset_id, a.purpose, a.capacity_l, a.geometry, a.reorder_pct, a.safe_fill_pct, latest.bucket_start AS last_at, latest.volume_l AS last_volume_l
     FROM assets a
     JOIN LATERAL (SELECT bucket_start, volume_sum / nullif(n, 0) AS volume_l FROM measurement_rollups r
                   WHERE r.asset_id = a.id AND r.bucket_s = 300 AND r.n > 0 ORDER BY bucket_start DESC LIMIT 1) latest ON true
     LEFT JOIN tank_forecasts f ON f.asset_id = a.id
     WHERE a.kind = 'tank'
       AND (f.asset_id IS NULL OR a.updated_at > f.computed_at
            OR (f.computed_at < now() - make_interval(secs => $1) AND latest.bucket_start > f.window_end))
     ORDER BY f.computed_at NULLS FIRST LIMIT $2`,
    [FORECAST_MAX_AGE_S, FORECAST_TANKS_PER_CYCLE],
  );
  if (tanks.length === 0) return 0;
  const series = await sqlRows<{ asset_id: string; bucket_start: Date; volume_l: number }>(
    `SELECT asset_id, bucket_start, sum(volume_sum) / sum(n) AS volume_l
     FROM measurement_rollups r
     JOIN unnest($1::uuid[], $2::timestamptz[]) AS t(id, last_at) ON r.asset_id = t.id
     WHERE r.bucket_s = 3600 AND r.n > 0 AND r.bucket_start > t.last_at - make_interval(secs => $3)
     GROUP BY asset_id, bucket_start ORDER BY asset_id, bucket_start`,
    [tanks.map((t) => t.asset_id), tanks.map((t) => t.last_at), windowS],
  );
  const byAsset = new Map<string, { at: Date; volumeL: number }[]>();
  for (const s of series) {
    const list = byAsset.get(s.asset_id) ?? [];
    list.push({ at: s.bucket_start, volumeL: s.volume_l });
    byAsset.set(s.asset_id, list);
  }
  const rows = tanks.map((t) => {
    const points = byAsset.get(t.asset_id) ?? [];
    // The 5-minute bucket's mean stands for "now" (at the bucket's middle); the hourly series carries the trend.
    const current = t.last_volume_l === null ? null : { at: new Date(t.last_at.getTime() + 150_000), volumeL: t.last_volume_l };
    const capacityL = t.capacity_l ?? (t.geometry ? tankCapacity(t.geometry) : null);
    const purpose = tankPurposeOf("tank", t.purpose) as TankPurpose;
    const f = forecastTank({ purpose, series: points, capacityL, reorderPct: t.reorder_pct, safeFillPct: t.safe_fill_pct, current });
    const windowStart = points.length ? points[0].at : t.last_at;
    return { assetId: t.asset_id, windowStart, windowEnd: t.last_at, current, f };
  });
  await writeForecasts(rows);
  return rows.length;
}

async function writeForecasts(rows: { assetId: string; windowStart: Date; windowEnd: Date; current: { volumeL: number } | null; f: TankForecast }[]): Promise<void> {
  const columns: [string, string, (r: (typeof rows)[number]) => unknown][] = [
    ["asset_id", "uuid", (r) => r.assetId],
    ["window_start", "timestamptz", (r) => r.windowStart],
    ["window_end", "timestamptz", (r) => r.windowEnd],
    ["samples", "int", (r) => r.f.samples],
    ["current_volume_l", "float8", (r) => r.current?.volumeL ?? null],
    ["slope_l_per_day", "float8", (r) => (r.f.rateLPerDay === null ? null : r.f.purpose === "sump" ? r.f.rateLPerDay : -r.f.rateLPerDay)],
    ["refills", "jsonb", (r) => JSON.stringify(r.f.refills)],
    ["purpose", "tank_purpose", (r) => r.f.purpose],
    ["status", "text", (r) => r.f.status],
    ["action", "text", (r) => r.f.action],
    ["reason", "text", (r) => r.f.reason],
    ["ready", "boolean", (r) => r.f.readiness?.ready ?? null],
    ["span_hours", "float8", (r) => r.f.readiness?.spanHours ?? null],
    ["points", "int", (r) => r.f.readiness?.points ?? null],
    ["r_squared", "float8", (r) => r.f.readiness?.rSquared ?? null],
    ["due_at", "timestamptz", (r) => r.f.dueAt],
    ["limit_at", "timestamptz", (r) => r.f.limitAt],
    ["volume_l", "float8", (r) => r.f.volumeL],
    ["rate_l_per_day", "float8", (r) => r.f.rateLPerDay],
  ];
  const names = columns.map(([name]) => name);
  await sqlRun(
    `INSERT INTO tank_forecasts (computed_at, ${names.join(", ")})
     SELECT now(), v.* FROM unnest(${columns.map(([, type], i) => `$${i + 1}::${type}[]`).join(", ")}) AS v(${names.join(", ")})
     ON CONFLICT (asset_id) DO UPDATE SET computed_at = excluded.computed_at, ${names.slice(1).map((n) => `${n} = excluded.${n}`).join(", ")}`,
    columns.map(([, , pick]) => rows.map(pick)),
  );
}
