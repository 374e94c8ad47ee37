// The uncertainty budget of an asset's latest measured distance, part by part (GUM, JCGM 100:2008): the
// same inputs the worker combined into the measurement's stored uncertainty, told one by one with where
// each comes from, so the asset page can show what the "± x mm" is made of.

import type { Scope } from "../db/site-scope";
import { sqlRows } from "../db/sql";
import { notFound } from "../errors";
import { findAsset } from "../services/assets";
import { airTemperatureUncertaintyK, type AirTemperatureDoubt } from "../uncertainty/air-temperature";
import { DEFAULT_STATED_ACCURACY_M, uncertaintyBudget, type BudgetPart } from "../uncertainty/budget";
import { buildTemperatureSeries, siteTemperatureAt } from "../worker/compute/air-temperature";
import { PIPELINE_SETTINGS } from "../worker/compute/settings";
import type { TempSource } from "../worker/compute/types";

interface BudgetRow {
  channel_id: string;
  channel_index: number;
  device_name: string;
  site_id: string;
  profile: string;
  clock_hz: number | null;
  prescaler: number | null;
  stated_accuracy_m: number | null;
  calibration_scale: number;
  calibration_rms_m: number | null;
  at: Date | null;
  raw_distance_m: number | null;
  distance_m: number | null;
  level_m: number | null;
  air_temp_c: number | null;
  temp_source: TempSource | null;
  speed_of_sound_ms: number | null;
  burst_n: number | null;
  spread_us: number | null;
  uncertainty_m: number | null;
}

const PART_NAMES: Record<BudgetPart, string> = {
  transducer: "Transducer's stated accuracy",
  air_temperature: "Air temperature (speed of sound)",
  timer: "Timer resolution",
  burst: "Spread of the burst's echoes",
  calibration: "Calibration fit",
};

const TEMP_SOURCE_WORDS: Record<TempSource, string> = {
  reading: "the reading's own air sensor",
  site_samples: "the site's temperature samples",
  site_fixed: "the site's fixed temperature",
  default: "the 20 °C default (no temperature known)",
};

/** The site samples' doubt at the measurement's time: how far apart the two interpolated were, how far the nearest lay. */
async function temperatureDoubt(source: TempSource, siteId: string, at: Date): Promise<AirTemperatureDoubt> {
  if (source !== "site_samples") return { source };
  const reach = PIPELINE_SETTINGS.tempInterpolationMaxGapS;
  const rows = await sqlRows<{ at: Date; air_temp_c: number }>(
    `SELECT at, air_temp_c FROM temperature_samples WHERE site_id = $1 AND at BETWEEN $2::timestamptz - make_interval(secs => $3) AND $2::timestamptz + make_interval(secs => $3)`,
    [siteId, at, reach],
  );
  const found = siteTemperatureAt(buildTemperatureSeries(rows.map((r) => ({ atMs: new Date(r.at).getTime(), airTempC: r.air_temp_c }))), at.getTime());
  return { source, spreadK: found?.spreadK ?? 0, ageS: (found?.ageMs ?? 0) / 1000 };
}

function sourceOf(part: BudgetPart, r: BudgetRow, tickUs: number | null, doubt: AirTemperatureDoubt): string {
  switch (part) {
    case "transducer":
      return r.stated_accuracy_m === null
        ? `±${(DEFAULT_STATED_ACCURACY_M * 1000).toFixed(0)} mm, the trade default for low-cost ultrasonic modules (not this channel's own figure); rectangular, a/√3 (GUM 4.3.7)`
        : `±${(r.stated_accuracy_m * 1000).toFixed(1)} mm, the channel's stated accuracy; rectangular, a/√3 (GUM 4.3.7)`;
    case "air_temperature": {
      const from = TEMP_SOURCE_WORDS[doubt.source];
      const samples = doubt.source === "site_samples" ? `, samples ${doubt.spreadK.toFixed(1)} K apart, nearest ${Math.round(doubt.ageS / 60)} min away` : "";
      return `${from}${samples}; sensitivity d/(2·T) as c ∝ √T (GUM 5.1.3)`;
    }
    case "timer":
      return `one tick of ${tickUs?.toFixed(3)} µs, q/√12 (GUM F.2.2.1)`;
    case "burst":
      return `median of ${r.burst_n} echoes, 1.4826·MAD·√(π/2)/√n (Type A)`;
    case "calibration":
      return "RMS of the last calibration's residuals against the dips (Type A)";
  }
}

/** The budget of the latest valid distance of the asset's channel (its first unless one is named). */
export async function assetUncertaintyBudget(scope: Scope, assetId: string, channelId: string | null) {
  await findAsset(scope, assetId);
  const rows = await sqlRows<BudgetRow>(
    `SELECT c.id AS channel_id, c.index AS channel_index, d.name AS device_name, d.site_id, d.profile, d.clock_hz, d.prescaler,
            c.stated_accuracy_m, c.calibration_scale,
            (SELECT cc.rms_after_m FROM calibration_changes cc WHERE cc.channel_id = c.id ORDER BY cc.at DESC LIMIT 1) AS calibration_rms_m,
            m.at, m.raw_distance_m, m.distance_m, m.level_m, m.air_temp_c, m.temp_source, m.speed_of_sound_ms, m.burst_n, m.spread_us, m.uncertainty_m
       FROM channels c JOIN devices d ON d.id = c.device_id
       LEFT JOIN LATERAL (SELECT * FROM measurements m WHERE m.channel_id = c.id AND m.status = 'ok' AND m.raw_distance_m IS NOT NULL
                           AND m.speed_of_sound_ms IS NOT NULL ORDER BY m.at DESC LIMIT 1) m ON true
      WHERE c.asset_id = $1 AND ($2::uuid IS NULL OR c.id = $2)
      ORDER BY d.name, c.index LIMIT 1`,
    [assetId, channelId],
  );
  const r = rows[0];
  if (!r) throw notFound(channelId ? "That channel" : "A channel measuring this asset");
  const channel = { id: r.channel_id, label: `${r.device_name}, channel ${r.channel_index}` };
  if (r.at === null || r.raw_distance_m === null || r.speed_of_sound_ms === null || r.air_temp_c === null || r.temp_source === null) {
    return { channel, measurement: null, budget: null };
  }
  const tickUs = r.profile === "capture" && r.clock_hz && r.prescaler ? (r.prescaler * 1e6) / r.clock_hz : null;
  const doubt = await temperatureDoubt(r.temp_source, r.site_id, new Date(r.at));
  const budget = uncertaintyBudget({
    rawDistanceM: r.raw_distance_m,
    speedMs: r.speed_of_sound_ms,
    tempC: r.air_temp_c,
    tempUncertaintyK: airTemperatureUncertaintyK(doubt),
    tickUs,
    burstSpreadUs: r.spread_us,
    burstN: r.burst_n,
    statedAccuracyM: r.stated_accuracy_m,
    calibrationRmsM: r.calibration_rms_m,
    calibrationScale: r.calibration_scale,
  });
  return {
    channel,
    measurement: {
      at: r.at,
      raw_distance_m: r.raw_distance_m,
      distance_m: r.distance_m,
      level_m: r.level_m,
      air_temp_c: r.air_temp_c,
      temp_source: r.temp_source,
      /** What the worker stored with the measurement: the budget's combined value when nothing changed since. */
      stored_uncertainty_m: r.uncertainty_m,
    },
    budget: {
      reference: "GUM, JCGM 100:2008",
      components: budget.components.map((c) => ({
        part: c.part,
        name: PART_NAMES[c.part],
        type: c.type,
        standard_uncertainty: c.standardUncertainty,
        unit: c.unit,
        sensitivity_m_per_unit: c.sensitivity,
        contribution_m: c.contributionM,
        variance_share: c.varianceShare,
        is_default: c.isDefault,
        source: sourceOf(c.part, r, tickUs, doubt),
      })),
      combined_m: budget.combinedM,
      coverage_factor: budget.coverageFactor,
      expanded_m: budget.expandedM,
    },
  };
}
export type UncertaintyBudgetJson = Awaited<ReturnType<typeof assetUncertaintyBudget>>;
