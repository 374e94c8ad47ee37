// Hampel identifier: a value is an outlier when it lies more than nσ from the window's median,
// with σ estimated robustly as 1.4826·MAD (Hampel 1974; Pearson et al. 2016, "Generalized Hampel
// filters"). The worker marks such a reading "suspect" rather than dropping it.
//
// One implementation, on scratch buffers rather than fresh arrays: the worker judges every reading,
// and allocating five sorted copies per reading once cost more than the rest of its pipeline together.

import { MAD_TO_SIGMA } from "./robust-stats";

export interface HampelOptions {
  /** Threshold in robust standard deviations; 3 is the usual choice. */
  nSigmas?: number;
  /**
   * Lower bound on the robust σ. A quantised channel often repeats one value, which makes the MAD
   * zero and any change at all an outlier; the reading resolution is a sensible floor.
   */
  minSigma?: number;
}

export interface HampelJudgeOptions extends HampelOptions {
  /** Windows with fewer values than this judge nothing. */
  minWindow?: number;
  /**
   * Judge the value against the Theil–Sen line through its window, extrapolated, instead of the
   * window's median. A causal median lags a moving level by about halfWindow readings, so without
   * this a steady draw-down or fill of a fraction of σ per reading is marked again and again.
   */
  detrend?: boolean;
}

export interface HampelFlagsOptions extends HampelJudgeOptions {
  /** Half-width k of the equivalent centred filter; each value is judged against the 2k values before it. */
  halfWindow: number;
}

const DEFAULT_N_SIGMAS = 3;
// Three values are the fewest whose median and MAD survive one outlier among them.
const DEFAULT_MIN_WINDOW = 3;

// Scratch buffers for windows of up to 64 values (the worker's are 2·halfWindow); a longer window
// gets buffers of its own.
interface Scratch {
  pairs: Float64Array;
  values: Float64Array;
  residuals: Float64Array;
}
const scratchFor = (n: number): Scratch => ({ pairs: new Float64Array((n * (n - 1)) / 2), values: new Float64Array(n), residuals: new Float64Array(n) });
const MAX_SHARED = 64;
const shared = scratchFor(MAX_SHARED);
const buffersFor = (n: number): Scratch => (n <= MAX_SHARED ? shared : scratchFor(n));

/** Median of the first n values of buf, reordering them in place. */
function medianInPlace(buf: Float64Array, n: number): number {
  const mid = n >> 1;
  if (n <= 16) {
    // Insertion sort: fastest for the short windows.
    for (let i = 1; i < n; i++) {
      const v = buf[i];
      let j = i - 1;
      while (j >= 0 && buf[j] > v) {
        buf[j + 1] = buf[j];
        j--;
      }
      buf[j + 1] = v;
    }
    return n % 2 === 1 ? buf[mid] : (buf[mid - 1] + buf[mid]) / 2;
  }
  // Hoare's selection (FIND) for the pairwise slopes: linear on average where sorting them was the
  // filter's biggest cost. It leaves the mid-th smallest at mid, with nothing larger before it.
  let lo = 0;
  let hi = n - 1;
  while (lo < hi) {
    const pivot = buf[(lo + hi) >> 1];
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (buf[i] < pivot) i++;
      while (buf[j] > pivot) j--;
      if (i <= j) {
        const t = buf[i];
        buf[i] = buf[j];
        buf[j] = t;
        i++;
        j--;
      }
    }
    if (mid <= j) hi = j;
    else if (mid >= i) lo = i;
    else break;
  }
  if (n % 2 === 1) return buf[mid];
  let below = buf[0];
  for (let i = 1; i < mid; i++) if (buf[i] > below) below = buf[i];
  return (below + buf[mid]) / 2;
}

/** The identifier on the first n values (n ≥ 1). */
function outlier(values: ArrayLike<number>, n: number, x: number, nSigmas: number, minSigma: number, scratch: Float64Array): boolean {
  for (let i = 0; i < n; i++) scratch[i] = values[i];
  const med = medianInPlace(scratch, n);
  for (let i = 0; i < n; i++) scratch[i] = Math.abs(values[i] - med);
  const mad = medianInPlace(scratch, n);
  const scale = Math.max(MAD_TO_SIGMA * mad, minSigma);
  return Math.abs(x - med) > nSigmas * scale;
}

/** True when x is a Hampel outlier with respect to the window. An empty window judges nothing. */
export function isHampelOutlier(window: readonly number[], x: number, options: HampelOptions = {}): boolean {
  const n = window.length;
  if (n === 0) return false;
  return outlier(window, n, x, options.nSigmas ?? DEFAULT_N_SIGMAS, options.minSigma ?? 0, buffersFor(n).values);
}

/**
 * True when x, the value after the window (oldest first), is a spike against it: the causal judge
 * the worker applies to each reading with its channel's saved window.
 */
export function isHampelSpike(window: readonly number[], x: number, options: HampelJudgeOptions = {}): boolean {
  const n = window.length;
  const { nSigmas = DEFAULT_N_SIGMAS, minSigma = 0, minWindow = DEFAULT_MIN_WINDOW, detrend = false } = options;
  if (n < Math.max(1, minWindow)) return false;
  const { pairs, values: scratch, residuals } = buffersFor(n);
  if (!detrend) return outlier(window, n, x, nSigmas, minSigma, scratch);
  // Theil–Sen through (i, window[i]): median of pairwise slopes, then median of yᵢ − slope·i. Its
  // intercept makes the residuals' median zero, so the plain identifier applies to them.
  let k = 0;
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) pairs[k++] = (window[j] - window[i]) / (j - i);
  }
  if (k === 0) return outlier(window, n, x, nSigmas, minSigma, scratch);
  const slope = medianInPlace(pairs, k);
  for (let i = 0; i < n; i++) scratch[i] = window[i] - slope * i;
  const intercept = medianInPlace(scratch, n);
  for (let i = 0; i < n; i++) residuals[i] = window[i] - (intercept + slope * i);
  return outlier(residuals, n, x - (intercept + slope * n), nSigmas, minSigma, scratch);
}

/**
 * Causal Hampel flags for a series, as a streaming worker sees it: value i is judged against the
 * up to 2·halfWindow values preceding it, never against later ones.
 */
export function hampelFlags(xs: readonly number[], options: HampelFlagsOptions): boolean[] {
  const { halfWindow } = options;
  if (!Number.isInteger(halfWindow) || halfWindow < 1) throw new RangeError("halfWindow must be a positive integer");
  const span = 2 * halfWindow;
  return xs.map((x, i) => isHampelSpike(xs.slice(Math.max(0, i - span), i), x, options));
}
