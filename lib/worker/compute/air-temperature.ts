// Air temperature at a reading's time, by the precedence of PRODUCT.md: the reading's own value; the
// site's temperature samples interpolated in time; the site's fixed value; 20 °C.

import { AIR_TEMPERATURE_UNCERTAINTY_K, airTemperatureUncertaintyK } from "../../uncertainty/air-temperature";
import { PIPELINE_SETTINGS } from "./settings";
import type { TempSource } from "./types";

export interface TemperatureSample {
  atMs: number;
  airTempC: number;
}

/** A site's samples sorted by time, for repeated look-ups. */
export interface TemperatureSeries {
  times: Float64Array;
  temps: Float64Array;
}

export function buildTemperatureSeries(samples: readonly TemperatureSample[]): TemperatureSeries {
  const sorted = samples.filter((s) => Number.isFinite(s.airTempC) && Number.isFinite(s.atMs)).sort((a, b) => a.atMs - b.atMs);
  return { times: Float64Array.from(sorted, (s) => s.atMs), temps: Float64Array.from(sorted, (s) => s.airTempC) };
}

/** Index of the first sample at or after t (times.length when none). */
function lowerBound(times: Float64Array, t: number): number {
  let lo = 0;
  let hi = times.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (times[mid] < t) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

export interface InterpolationLimits {
  maxGapMs: number;
  nearestMaxMs: number;
}

const DEFAULT_LIMITS: InterpolationLimits = {
  maxGapMs: PIPELINE_SETTINGS.tempInterpolationMaxGapS * 1000,
  nearestMaxMs: PIPELINE_SETTINGS.tempNearestMaxS * 1000,
};

export interface SiteTemperature {
  tempC: number;
  /** |difference| of the two samples interpolated between; 0 when one sample was used. */
  spreadK: number;
  /** Time from t to the nearest sample used, ms. */
  ageMs: number;
}

/**
 * Temperature at t by linear interpolation between the samples either side, when they are close
 * enough together; otherwise the nearest sample if it is close enough to t; otherwise null. Says how
 * far apart the samples were and how far t lay from them, for the temperature's uncertainty.
 */
export function siteTemperatureAt(series: TemperatureSeries, tMs: number, limits: InterpolationLimits = DEFAULT_LIMITS): SiteTemperature | null {
  const { times, temps } = series;
  if (times.length === 0) return null;
  const i = lowerBound(times, tMs);
  if (i < times.length && times[i] === tMs) return { tempC: temps[i], spreadK: 0, ageMs: 0 };
  const before = i - 1;
  const after = i;
  if (before >= 0 && after < times.length && times[after] - times[before] <= limits.maxGapMs) {
    const w = (tMs - times[before]) / (times[after] - times[before]);
    return {
      tempC: temps[before] + w * (temps[after] - temps[before]),
      spreadK: Math.abs(temps[after] - temps[before]),
      ageMs: Math.min(tMs - times[before], times[after] - tMs),
    };
  }
  const candidates = [before, after].filter((j) => j >= 0 && j < times.length && Math.abs(times[j] - tMs) <= limits.nearestMaxMs);
  if (candidates.length === 0) return null;
  const nearest = candidates.reduce((a, b) => (Math.abs(times[a] - tMs) <= Math.abs(times[b] - tMs) ? a : b));
  return { tempC: temps[nearest], spreadK: 0, ageMs: Math.abs(times[nearest] - tMs) };
}

export function interpolateTemperature(series: TemperatureSeries, tMs: number, limits: InterpolationLimits = DEFAULT_LIMITS): number | null {
  return siteTemperatureAt(series, tMs, limits)?.tempC ?? null;
}

export interface AirTemperature {
  tempC: number;
  source: TempSource;
  /** Standard uncertainty of the value, K, by source. */
  uncertaintyK: number;
  /** Why the reading's own value was passed over, when it was. */
  note: string | null;
}

export interface AirTemperatureInput {
  readingTempC: number | null;
  atMs: number;
  siteSeries: TemperatureSeries | null;
  siteFixedC: number | null;
}

function plausible(t: number): boolean {
  return Number.isFinite(t) && t >= PIPELINE_SETTINGS.readingTempMinC && t <= PIPELINE_SETTINGS.readingTempMaxC;
}

export function resolveAirTemperature({ readingTempC, atMs, siteSeries, siteFixedC }: AirTemperatureInput): AirTemperature {
  const u = AIR_TEMPERATURE_UNCERTAINTY_K;
  let note: string | null = null;
  if (readingTempC !== null) {
    if (plausible(readingTempC)) return { tempC: readingTempC, source: "reading", uncertaintyK: u.reading, note };
    note = `reading's air_temp_c ${readingTempC} °C is implausible and was ignored`;
  }
  const sampled = siteSeries ? siteTemperatureAt(siteSeries, atMs) : null;
  if (sampled !== null) {
    const uncertaintyK = airTemperatureUncertaintyK({ source: "site_samples", spreadK: sampled.spreadK, ageS: sampled.ageMs / 1000 });
    return { tempC: sampled.tempC, source: "site_samples", uncertaintyK, note };
  }
  if (siteFixedC !== null && Number.isFinite(siteFixedC)) return { tempC: siteFixedC, source: "site_fixed", uncertaintyK: u.site_fixed, note };
  return { tempC: PIPELINE_SETTINGS.defaultTempC, source: "default", uncertaintyK: u.default, note };
}
