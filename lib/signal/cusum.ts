// Tabular (two-sided) CUSUM, Page (1954), Biometrika 41:100–115, in the form of Montgomery,
// Introduction to Statistical Quality Control, §9.1 (REFERENCES.md §5):
//   C⁺ᵢ = max(0, xᵢ − (μ₀ + K) + C⁺ᵢ₋₁),  C⁻ᵢ = max(0, (μ₀ − K) − xᵢ + C⁻ᵢ₋₁),  K = k·σ, H = h·σ.
// N⁺ and N⁻ count the consecutive periods a side has been above zero; they date the shift.

import { robustSigmaFromDifferences } from "./robust-stats";

export type ShiftDirection = "up" | "down";

export interface CusumOptions {
  /** Target (in-control) mean μ₀. */
  mean: number;
  /** In-control standard deviation σ (> 0). */
  sigma: number;
  /** Reference value in units of σ (K = k·σ); 0.5 tunes the chart to a 1σ shift. */
  k: number;
  /** Decision interval in units of σ (H = h·σ). */
  h: number;
}

export interface CusumState {
  cPlus: number;
  cMinus: number;
  nPlus: number;
  nMinus: number;
}

export interface CusumStep extends CusumState {
  signal: ShiftDirection | null;
}

export interface Cusum {
  step(x: number): CusumStep;
  /** The accumulators so far, to save and resume a streaming chart. */
  state(): CusumState;
  reset(): void;
}

export interface CusumSignal {
  /** Index (0-based) of the first value whose sum exceeded H. */
  index: number;
  /** Index where that side's run began: index − N + 1; the shift happened just before it. */
  onsetIndex: number;
  direction: ShiftDirection;
  /** Estimated new process mean: μ₀ + K + C⁺/N⁺ (up) or μ₀ − K − C⁻/N⁻ (down). */
  newMean: number;
}

export interface CusumRun {
  steps: CusumStep[];
  firstSignal: CusumSignal | null;
}

const ZERO_STATE: CusumState = { cPlus: 0, cMinus: 0, nPlus: 0, nMinus: 0 };

function validate({ mean, sigma, k, h }: CusumOptions): void {
  if (!Number.isFinite(mean)) throw new RangeError("CUSUM mean must be finite");
  if (!(sigma > 0) || !Number.isFinite(sigma)) throw new RangeError("CUSUM sigma must be positive");
  if (!(k >= 0) || !Number.isFinite(k)) throw new RangeError("CUSUM k must be zero or positive");
  if (!(h > 0) || !Number.isFinite(h)) throw new RangeError("CUSUM h must be positive");
}

/** A two-sided tabular CUSUM; pass a saved state to resume it. It keeps accumulating after a signal. */
export function createCusum(options: CusumOptions, initial: CusumState = ZERO_STATE): Cusum {
  validate(options);
  const upper = options.mean + options.k * options.sigma;
  const lower = options.mean - options.k * options.sigma;
  const limit = options.h * options.sigma;
  let { cPlus, cMinus, nPlus, nMinus } = initial;

  return {
    step(x: number): CusumStep {
      cPlus = Math.max(0, x - upper + cPlus);
      cMinus = Math.max(0, lower - x + cMinus);
      nPlus = cPlus > 0 ? nPlus + 1 : 0;
      nMinus = cMinus > 0 ? nMinus + 1 : 0;
      const up = cPlus > limit;
      const down = cMinus > limit;
      // Both sides past H at once takes an extreme swing; report the larger excursion.
      const signal: ShiftDirection | null = up && (!down || cPlus >= cMinus) ? "up" : down ? "down" : null;
      return { cPlus, cMinus, nPlus, nMinus, signal };
    },
    state: () => ({ cPlus, cMinus, nPlus, nMinus }),
    reset() {
      cPlus = 0;
      cMinus = 0;
      nPlus = 0;
      nMinus = 0;
    },
  };
}

/** Runs a CUSUM from zero over a series and reports every step and the first signal. */
export function runCusum(xs: readonly number[], options: CusumOptions): CusumRun {
  const chart = createCusum(options);
  const steps: CusumStep[] = [];
  let firstSignal: CusumSignal | null = null;
  const kSigma = options.k * options.sigma;
  for (let i = 0; i < xs.length; i++) {
    const s = chart.step(xs[i]);
    steps.push(s);
    if (firstSignal === null && s.signal !== null) {
      firstSignal =
        s.signal === "up"
          ? { index: i, onsetIndex: i - s.nPlus + 1, direction: "up", newMean: options.mean + kSigma + s.cPlus / s.nPlus }
          : { index: i, onsetIndex: i - s.nMinus + 1, direction: "down", newMean: options.mean - kSigma - s.cMinus / s.nMinus };
    }
  }
  return { steps, firstSignal };
}

export interface Residual {
  at: Date | number;
  value: number;
}

export interface DriftOptions {
  /** Expected residual when the sensor is right; 0 for measured − reference. */
  mean?: number;
  /** Residual noise σ; estimated from successive differences when absent. */
  sigma?: number;
  /** Lower bound on σ, e.g. the reading resolution, so a perfectly steady sensor can still be judged. */
  minSigma?: number;
  k?: number;
  h?: number;
  /** Fewer residuals than this give no verdict. */
  minSamples?: number;
}

export interface DriftVerdict {
  drifting: boolean;
  /** Time of the first residual of the run that crossed H. */
  onsetAt: Date | null;
  /** Time of the residual at which the chart signalled. */
  detectedAt: Date | null;
  /** Size of the shift, |new mean − mean|, in the residuals' unit. */
  magnitude: number | null;
  direction: ShiftDirection | null;
  /** σ the chart used. */
  sigma: number;
}

// k = 0.5 with h = 5 is the textbook design against a 1σ shift (Montgomery §9.1, recommendations for
// CUSUM design); in-control ARL ≈ 465 (REFERENCES.md §5).
const DEFAULT_K = 0.5;
const DEFAULT_H = 5;
const DEFAULT_MIN_SAMPLES = 8;

/**
 * Drift of a channel against its reference (empty-bay floor, manual dips, a fixed target): a
 * CUSUM over the residuals in time order. Null when there are too few residuals or no usable σ.
 */
export function detectDrift(residuals: readonly Residual[], options: DriftOptions = {}): DriftVerdict | null {
  const { mean = 0, minSigma = 0, k = DEFAULT_K, h = DEFAULT_H, minSamples = DEFAULT_MIN_SAMPLES } = options;
  if (residuals.length < Math.max(2, minSamples)) return null;
  const ordered = residuals
    .map((r) => ({ at: r.at instanceof Date ? r.at.getTime() : r.at, value: r.value }))
    .sort((a, b) => a.at - b.at);
  const values = ordered.map((r) => r.value);
  const sigma = Math.max(options.sigma ?? robustSigmaFromDifferences(values), minSigma);
  if (!(sigma > 0) || !Number.isFinite(sigma)) return null;

  const { firstSignal } = runCusum(values, { mean, sigma, k, h });
  if (firstSignal === null) {
    return { drifting: false, onsetAt: null, detectedAt: null, magnitude: null, direction: null, sigma };
  }
  return {
    drifting: true,
    onsetAt: new Date(ordered[firstSignal.onsetIndex].at),
    detectedAt: new Date(ordered[firstSignal.index].at),
    magnitude: Math.abs(firstSignal.newMean - mean),
    direction: firstSignal.direction,
    sigma,
  };
}
