// The causal Hampel identifier of lib/signal/hampel (hampelFlags, with or without detrend), judged one
// value at a time against a short saved window. Same arithmetic in the same order, but on scratch
// buffers instead of fresh arrays: the worker judges every reading, and allocating five sorted copies
// per reading cost more than the rest of the pipeline together. The unit tests check that it agrees
// with hampelFlags value for value.

import { MAD_TO_SIGMA } from "../../signal/robust-stats";

export interface HampelJudgeOptions {
  nSigmas: number;
  minSigma: number;
  minWindow: number;
}

// Windows are at most 2·halfWindow values; 64 leaves room for any sensible setting.
const MAX_WINDOW = 64;
const scratchA = new Float64Array(MAX_WINDOW * MAX_WINDOW);
const scratchB = new Float64Array(MAX_WINDOW);
const residuals = new Float64Array(MAX_WINDOW);

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

function medianOf(values: ArrayLike<number>, n: number): number {
  for (let i = 0; i < n; i++) scratchB[i] = values[i];
  return medianInPlace(scratchB, n);
}

/** isHampelOutlier(window, x) on the first n values. */
function outlier(values: ArrayLike<number>, n: number, x: number, { nSigmas, minSigma }: HampelJudgeOptions): boolean {
  const med = medianOf(values, n);
  for (let i = 0; i < n; i++) scratchB[i] = Math.abs(values[i] - med);
  const mad = medianInPlace(scratchB, n);
  const scale = Math.max(MAD_TO_SIGMA * mad, minSigma);
  return Math.abs(x - med) > nSigmas * scale;
}

/** True when x is a spike against the window (oldest first), as hampelFlags would judge it. */
export function isHampelSpike(window: readonly number[], x: number, detrend: boolean, options: HampelJudgeOptions): boolean {
  const n = window.length;
  if (n < Math.max(1, options.minWindow)) return false;
  if (n > MAX_WINDOW) throw new RangeError(`Hampel window of ${n} exceeds ${MAX_WINDOW}`);
  if (!detrend) return outlier(window, n, x, options);
  // Theil–Sen through (i, window[i]): median of pairwise slopes, then median of yᵢ − slope·i.
  let k = 0;
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) scratchA[k++] = (window[j] - window[i]) / (j - i);
  }
  const slope = medianInPlace(scratchA, k);
  for (let i = 0; i < n; i++) scratchB[i] = window[i] - slope * i;
  const intercept = medianInPlace(scratchB, n);
  for (let i = 0; i < n; i++) residuals[i] = window[i] - (intercept + slope * i);
  return outlier(residuals, n, x - (intercept + slope * n), options);
}
