// EWMA control chart, Roberts (1959), Technometrics 1:239–250 (REFERENCES.md §5):
//   zᵢ = λ·xᵢ + (1 − λ)·zᵢ₋₁, z₀ = μ₀,
//   limits μ₀ ± L·σ·√(λ/(2 − λ)·[1 − (1 − λ)^{2i}]).
// The exact, time-varying limits are narrow at the start, so a shift present from the first
// reading is caught sooner than with the asymptotic (fixed) limits μ₀ ± L·σ·√(λ/(2 − λ)), which
// published ARL tables for shifted processes mostly assume.

import type { ShiftDirection } from "./cusum";

export interface EwmaOptions {
  mean: number;
  sigma: number;
  /** Smoothing weight, 0 < λ ≤ 1. */
  lambda: number;
  /** Width of the limits in units of the EWMA's standard deviation. */
  L: number;
  /** Use the fixed limits the time-varying ones converge to (default: time-varying). */
  asymptoticLimits?: boolean;
}

export interface EwmaStep {
  z: number;
  lower: number;
  upper: number;
  signal: ShiftDirection | null;
}

export interface EwmaState {
  z: number;
  /** Values seen so far (i of the last step). */
  count: number;
}

export interface Ewma {
  step(x: number): EwmaStep;
  state(): EwmaState;
  reset(): void;
}

export interface EwmaRun {
  steps: EwmaStep[];
  firstSignal: { index: number; direction: ShiftDirection } | null;
}

function validate({ mean, sigma, lambda, L }: EwmaOptions): void {
  if (!Number.isFinite(mean)) throw new RangeError("EWMA mean must be finite");
  if (!(sigma > 0) || !Number.isFinite(sigma)) throw new RangeError("EWMA sigma must be positive");
  if (!(lambda > 0 && lambda <= 1)) throw new RangeError("EWMA lambda must be in (0, 1]");
  if (!(L > 0) || !Number.isFinite(L)) throw new RangeError("EWMA L must be positive");
}

/** Control limits for the i-th value (i ≥ 1). */
export function ewmaControlLimits(
  i: number,
  { mean, sigma, lambda, L, asymptoticLimits = false }: EwmaOptions,
): { lower: number; upper: number } {
  const startUp = asymptoticLimits ? 1 : 1 - Math.pow(1 - lambda, 2 * i);
  const halfWidth = L * sigma * Math.sqrt((lambda / (2 - lambda)) * startUp);
  return { lower: mean - halfWidth, upper: mean + halfWidth };
}

/** An EWMA chart; pass a saved state to resume it. */
export function createEwma(options: EwmaOptions, initial?: EwmaState): Ewma {
  validate(options);
  const { mean, lambda } = options;
  let z = initial?.z ?? mean;
  let count = initial?.count ?? 0;

  return {
    step(x: number): EwmaStep {
      z = lambda * x + (1 - lambda) * z;
      count += 1;
      const { lower, upper } = ewmaControlLimits(count, options);
      const signal: ShiftDirection | null = z > upper ? "up" : z < lower ? "down" : null;
      return { z, lower, upper, signal };
    },
    state: () => ({ z, count }),
    reset() {
      z = mean;
      count = 0;
    },
  };
}

/** Runs an EWMA chart from z₀ = μ₀ over a series and reports every step and the first signal. */
export function runEwma(xs: readonly number[], options: EwmaOptions): EwmaRun {
  const chart = createEwma(options);
  const steps: EwmaStep[] = [];
  let firstSignal: EwmaRun["firstSignal"] = null;
  for (let i = 0; i < xs.length; i++) {
    const s = chart.step(xs[i]);
    steps.push(s);
    if (firstSignal === null && s.signal !== null) firstSignal = { index: i, direction: s.signal };
  }
  return { steps, firstSignal };
}
