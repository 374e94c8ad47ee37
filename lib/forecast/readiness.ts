// When a consumption forecast means something. A trend fitted to a few hours after start, or to a
// level that wanders, gives "empty in 0.0 d" or a date next year; below the criterion the plan says
// "no forecast yet" and why, instead of a number. The criterion is written in DEVELOPERS.md
// ("Forecast readiness"); change both together.

import { detectRefills, type RefillDetectionOptions, type VolumeSample } from "./consumption";

export const FORECAST_READINESS = {
  /** The draw-down since the last refill spans two days, so a daily pattern of use is seen twice. */
  minSpanHours: 48,
  /** At least this many points in it (a day of hourly means). */
  minPoints: 24,
  /** A straight line explains at least this share of the level's variation over it (R² of the fit). */
  minRSquared: 0.6,
} as const;

export interface Readiness {
  ready: boolean;
  /** Why not, in words for the screen; null when ready. */
  reason: string | null;
  /** Hours from the first to the last point of the draw-down the forecast would use. */
  spanHours: number;
  points: number;
  /** Coefficient of determination of a least-squares line through it; null with fewer than 3 points or no variation. */
  rSquared: number | null;
}

/** R² of an ordinary least-squares line y = a + b·x: 1 − SS_res/SS_tot. */
export function coefficientOfDetermination(points: readonly { x: number; y: number }[]): number | null {
  const n = points.length;
  if (n < 3) return null;
  const meanX = points.reduce((s, p) => s + p.x, 0) / n;
  const meanY = points.reduce((s, p) => s + p.y, 0) / n;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (const p of points) {
    const dx = p.x - meanX;
    const dy = p.y - meanY;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  if (!(sxx > 0) || !(syy > 0)) return null;
  // For a least-squares line SS_res = SS_tot − S_xy²/S_xx.
  return (sxy * sxy) / (sxx * syy);
}

/** The points after the last refill, in time order: what the forecast fits. */
export function latestDrawDown(series: readonly VolumeSample[], options: RefillDetectionOptions): VolumeSample[] {
  const sorted = series.filter((s) => Number.isFinite(s.volumeL)).sort((a, b) => a.at.getTime() - b.at.getTime());
  const refills = detectRefills(sorted, options);
  return refills.length ? sorted.slice(refills[refills.length - 1].peakIndex) : sorted;
}

/** Whether the draw-down since the last refill is long and steady enough to forecast from. */
export function forecastReadiness(series: readonly VolumeSample[], options: RefillDetectionOptions): Readiness {
  const segment = latestDrawDown(series, options);
  const points = segment.length;
  const spanHours = points > 1 ? (segment[points - 1].at.getTime() - segment[0].at.getTime()) / 3_600_000 : 0;
  const t0 = points ? segment[0].at.getTime() : 0;
  const rSquared = coefficientOfDetermination(segment.map((s) => ({ x: (s.at.getTime() - t0) / 3_600_000, y: s.volumeL })));
  const c = FORECAST_READINESS;
  let reason: string | null = null;
  if (spanHours < c.minSpanHours) {
    reason = `Needs ${c.minSpanHours} h of level history since the last refill; there are ${Math.floor(spanHours)} h so far.`;
  } else if (points < c.minPoints) {
    reason = `Needs at least ${c.minPoints} hourly values since the last refill; there are ${points}.`;
  } else if (rSquared === null || rSquared < c.minRSquared) {
    reason = "The level has not changed steadily enough since the last refill to project it.";
  }
  return { ready: reason === null, reason, spanHours, points, rSquared };
}
