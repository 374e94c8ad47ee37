// Hampel identifier: a value is an outlier when it lies more than nσ from the window's median,
// with σ estimated robustly as 1.4826·MAD (Hampel 1974; Pearson et al. 2016, "Generalized Hampel
// filters"). The worker marks such a reading "suspect" rather than dropping it.

import { median, medianAbsoluteDeviation, theilSenSlope, MAD_TO_SIGMA } from "./robust-stats";

export interface HampelOptions {
  /** Threshold in robust standard deviations; 3 is the usual choice. */
  nSigmas?: number;
  /**
   * Lower bound on the robust σ. A quantised channel often repeats one value, which makes the MAD
   * zero and any change at all an outlier; the reading resolution is a sensible floor.
   */
  minSigma?: number;
}

export interface HampelFlagsOptions extends HampelOptions {
  /** Half-width k of the equivalent centred filter; each value is judged against the 2k values before it. */
  halfWindow: number;
  /** Values with fewer predecessors than this are not judged. */
  minWindow?: number;
  /**
   * Judge each value against the Theil–Sen line through its window, extrapolated, instead of the
   * window's median. A causal median lags a moving level by about halfWindow readings, so without
   * this a steady draw-down or fill of a fraction of σ per reading is marked again and again.
   */
  detrend?: boolean;
}

const DEFAULT_N_SIGMAS = 3;
// Three values are the fewest whose median and MAD survive one outlier among them.
const DEFAULT_MIN_WINDOW = 3;

/** True when x is a Hampel outlier with respect to the window. An empty window judges nothing. */
export function isHampelOutlier(window: readonly number[], x: number, options: HampelOptions = {}): boolean {
  if (window.length === 0) return false;
  const { nSigmas = DEFAULT_N_SIGMAS, minSigma = 0 } = options;
  const scale = Math.max(MAD_TO_SIGMA * medianAbsoluteDeviation(window), minSigma);
  return Math.abs(x - median(window)) > nSigmas * scale;
}

// The value's deviation from its window's trend line, and the window's residuals about that line.
function detrended(window: readonly number[], x: number): { residuals: number[]; deviation: number } {
  const fit = theilSenSlope(window.map((y, i) => ({ x: i, y })));
  if (fit === null) return { residuals: [...window], deviation: x - median(window) };
  const residuals = window.map((y, i) => y - (fit.intercept + fit.slope * i));
  return { residuals, deviation: x - (fit.intercept + fit.slope * window.length) };
}

/**
 * Causal Hampel flags for a series, as a streaming worker sees it: value i is judged against the
 * up to 2·halfWindow values preceding it, never against later ones.
 */
export function hampelFlags(xs: readonly number[], options: HampelFlagsOptions): boolean[] {
  const { halfWindow, minWindow = DEFAULT_MIN_WINDOW, detrend = false } = options;
  if (!Number.isInteger(halfWindow) || halfWindow < 1) throw new RangeError("halfWindow must be a positive integer");
  const span = 2 * halfWindow;
  return xs.map((x, i) => {
    const window = xs.slice(Math.max(0, i - span), i);
    if (window.length < Math.max(1, minWindow)) return false;
    if (!detrend) return isHampelOutlier(window, x, options);
    // Theil–Sen's intercept makes the residuals' median zero, so the plain identifier applies to them.
    const { residuals, deviation } = detrended(window, x);
    return isHampelOutlier(residuals, deviation, options);
  });
}
