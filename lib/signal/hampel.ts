// Hampel identifier: a value is an outlier when it lies more than nσ from the window's median,
// with σ estimated robustly as 1.4826·MAD (Hampel 1974; Pearson et al. 2016, "Generalized Hampel
// filters"). The worker marks such a reading "suspect" rather than dropping it.

import { median, medianAbsoluteDeviation, MAD_TO_SIGMA } from "./robust-stats";

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

/**
 * Causal Hampel flags for a series, as a streaming worker sees it: value i is judged against the
 * up to 2·halfWindow values preceding it, never against later ones.
 */
export function hampelFlags(xs: readonly number[], options: HampelFlagsOptions): boolean[] {
  const { halfWindow, minWindow = DEFAULT_MIN_WINDOW } = options;
  if (!Number.isInteger(halfWindow) || halfWindow < 1) throw new RangeError("halfWindow must be a positive integer");
  const span = 2 * halfWindow;
  return xs.map((x, i) => {
    const window = xs.slice(Math.max(0, i - span), i);
    return window.length >= Math.max(1, minWindow) && isHampelOutlier(window, x, options);
  });
}
