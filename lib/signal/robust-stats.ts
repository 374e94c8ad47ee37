// Robust statistics: estimates that a few spikes, dropouts or refills do not drag along.

/** Scale factor that turns a MAD into a standard deviation for normal data (1 / Φ⁻¹(3/4)). */
export const MAD_TO_SIGMA = 1.4826;

export interface Point {
  x: number;
  y: number;
}

export interface LineFit {
  slope: number;
  intercept: number;
}

function requireValues(xs: readonly number[], what: string): void {
  if (xs.length === 0) throw new RangeError(`${what} of an empty list`);
}

/** Median; the mean of the two middle values for an even count. Throws on an empty list. */
export function median(xs: readonly number[]): number {
  requireValues(xs, "median");
  // A typed array sorts numerically and fast, which matters for the O(n²) slopes below.
  const sorted = Float64Array.from(xs).sort();
  const mid = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

/** Median absolute deviation from the median (raw, not scaled). Throws on an empty list. */
export function medianAbsoluteDeviation(xs: readonly number[]): number {
  const m = median(xs);
  return median(xs.map((x) => Math.abs(x - m)));
}

/** Robust standard deviation: 1.4826 · MAD. */
export function robustSigma(xs: readonly number[]): number {
  return MAD_TO_SIGMA * medianAbsoluteDeviation(xs);
}

/**
 * Robust standard deviation of the noise from successive differences, 1.4826 · MAD(Δx) / √2.
 * A step or a steady trend moves only the median of the differences, not their spread, so this
 * estimates the noise of a series that is itself shifting (the idea of the individuals chart's
 * moving range, made robust). Needs at least 2 values.
 */
export function robustSigmaFromDifferences(xs: readonly number[]): number {
  if (xs.length < 2) throw new RangeError("need at least 2 values for successive differences");
  const diffs: number[] = [];
  for (let i = 1; i < xs.length; i++) diffs.push(xs[i] - xs[i - 1]);
  return robustSigma(diffs) / Math.SQRT2;
}

function pairwiseSlopes(points: readonly Point[], into: number[]): void {
  for (let i = 0; i < points.length; i++) {
    for (let j = i + 1; j < points.length; j++) {
      const dx = points[j].x - points[i].x;
      // Pairs at the same x carry no slope information.
      if (dx !== 0) into.push((points[j].y - points[i].y) / dx);
    }
  }
}

/**
 * Theil–Sen line (Theil 1950, Sen 1968): slope = median of all pairwise slopes, intercept =
 * median of yᵢ − slope·xᵢ. Null when fewer than two distinct x values exist.
 */
export function theilSenSlope(points: readonly Point[]): LineFit | null {
  const slopes: number[] = [];
  pairwiseSlopes(points, slopes);
  if (slopes.length === 0) return null;
  const slope = median(slopes);
  const intercept = median(points.map((p) => p.y - slope * p.x));
  return { slope, intercept };
}

/**
 * Theil–Sen slope pooled over groups: the median of the pairwise slopes taken within each group
 * only, as in the seasonal Kendall slope of Hirsch, Slack & Smith (1982). Used for several
 * draw-down segments of a tank whose offsets differ after each refill. Null when no group has two
 * distinct x values.
 */
export function pooledTheilSenSlope(groups: readonly (readonly Point[])[]): number | null {
  const slopes: number[] = [];
  for (const group of groups) pairwiseSlopes(group, slopes);
  return slopes.length === 0 ? null : median(slopes);
}
