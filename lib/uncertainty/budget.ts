// Uncertainty budget of a measured distance after the GUM (JCGM 100:2008). The model is
//   d = s·(c(T)·t/2) + o + δ_transducer + δ_calibration
// with t the round-trip time, T the air temperature, s and o the channel's calibration. Inputs are
// independent, so u_c(d)² = Σ (cᵢ·u(xᵢ))² (§5.1.2) with the sensitivity coefficients cᵢ = ∂d/∂xᵢ:
//   ∂d/∂t = s·c/2,  ∂d/∂T = s·(t/2)·dc/dT = s·d_raw/(2·T_K) (c ∝ √T_K, so dc/dT = c/(2·T_K)),
//   ∂d/∂δ = 1 for the transducer's stated accuracy and the calibration fit's residual.
// The worker calls distanceStandardUncertainty once per reading (a few multiplications, no objects);
// the asset page calls uncertaintyBudget for the same numbers as a list of parts.

const KELVIN_OFFSET = 273.15;
/** Asymptotic standard error of a sample median, √(π/2)·σ/√n for normal data (e.g. Kendall & Stuart). */
const MEDIAN_SE_FACTOR = Math.sqrt(Math.PI / 2);
/** 1.4826·MAD estimates σ of normal data. */
const MAD_TO_SIGMA = 1.4826;
/** Coverage factor for about 95 % with a normal combined distribution (GUM §6.2–6.3). */
export const COVERAGE_FACTOR = 2;

/**
 * The trade default for a channel without its own stated accuracy: ±3 mm, a figure commonly stated
 * for low-cost ultrasonic distance modules (from memory; REFERENCES.md §7 marks it the same way). It is
 * a default, not a measured property: the asset page says so and the channel's stated_accuracy_m
 * replaces it.
 */
export const DEFAULT_STATED_ACCURACY_M = 0.003;

export type BudgetPart = "transducer" | "timer" | "air_temperature" | "burst" | "calibration";

export interface DistanceUncertaintyInput {
  /** c·t/2 before calibration, metres. */
  rawDistanceM: number;
  /** Speed of sound used, m/s. */
  speedMs: number;
  tempC: number;
  /** Standard uncertainty of the air temperature, K (see airTemperatureUncertainty). */
  tempUncertaintyK: number;
  /** Timer resolution (one tick), µs; null when the time comes without a known tick. */
  tickUs: number | null;
  /** Burst of pings: MAD of the round-trip times, µs, and how many pings; null for a single echo. */
  burstSpreadUs: number | null;
  burstN: number | null;
  /** Half-width of the transducer's stated accuracy, metres; null = DEFAULT_STATED_ACCURACY_M. */
  statedAccuracyM: number | null;
  /** Root mean square of the calibration fit's residuals, metres; null when never calibrated from dips. */
  calibrationRmsM: number | null;
  calibrationScale: number;
}

/** GUM §4.3.7: a rectangular distribution of half-width a has u = a/√3. */
export function rectangularUncertainty(halfWidth: number): number {
  return halfWidth / Math.sqrt(3);
}

/** GUM F.2.2.1: a resolution (quantisation step) q gives u = q/√12. */
export function resolutionUncertainty(step: number): number {
  return step / Math.sqrt(12);
}

/** Type A: standard uncertainty (µs) of a burst's median round-trip time from its MAD over n pings. */
export function burstMedianUncertaintyUs(madUs: number, n: number): number {
  if (!(n >= 2)) return 0;
  return (MEDIAN_SE_FACTOR * MAD_TO_SIGMA * madUs) / Math.sqrt(n);
}

/** ∂d/∂T in metres per kelvin for a raw distance at temperature T (before calibration). */
export function temperatureSensitivityMPerK(rawDistanceM: number, tempC: number): number {
  return Math.abs(rawDistanceM) / (2 * (tempC + KELVIN_OFFSET));
}

/** ∂d/∂t in metres per microsecond (before calibration): c/2. */
export function timeSensitivityMPerUs(speedMs: number): number {
  return (speedMs * 1e-6) / 2;
}

/** Combined standard uncertainty u_c(d), metres: the worker's per-reading path. */
export function distanceStandardUncertainty(x: DistanceUncertaintyInput): number {
  const s = Math.abs(x.calibrationScale);
  const perUs = s * timeSensitivityMPerUs(x.speedMs);
  const timer = x.tickUs !== null ? perUs * resolutionUncertainty(x.tickUs) : 0;
  const burst = x.burstSpreadUs !== null && x.burstN !== null ? perUs * burstMedianUncertaintyUs(x.burstSpreadUs, x.burstN) : 0;
  const temp = s * temperatureSensitivityMPerK(x.rawDistanceM, x.tempC) * x.tempUncertaintyK;
  const transducer = rectangularUncertainty(x.statedAccuracyM ?? DEFAULT_STATED_ACCURACY_M);
  const calibration = x.calibrationRmsM ?? 0;
  return Math.sqrt(timer * timer + burst * burst + temp * temp + transducer * transducer + calibration * calibration);
}

export interface BudgetComponent {
  part: BudgetPart;
  /** GUM evaluation type: A from the data themselves, B from other information. */
  type: "A" | "B";
  /** Standard uncertainty of the input quantity, in `unit`. */
  standardUncertainty: number;
  unit: "m" | "µs" | "K";
  /** |∂d/∂xᵢ| in metres per `unit`. */
  sensitivity: number;
  /** |cᵢ|·u(xᵢ), metres. */
  contributionM: number;
  /** Share of u_c² (0–1), so the page can say which part dominates. */
  varianceShare: number;
  /** True when the value is the trade default rather than the channel's own. */
  isDefault: boolean;
}

export interface UncertaintyBudget {
  components: BudgetComponent[];
  combinedM: number;
  coverageFactor: number;
  expandedM: number;
}

/** The same budget as distanceStandardUncertainty, part by part, with U = k·u_c (k = 2). */
export function uncertaintyBudget(x: DistanceUncertaintyInput): UncertaintyBudget {
  const s = Math.abs(x.calibrationScale);
  const perUs = s * timeSensitivityMPerUs(x.speedMs);
  const parts: Omit<BudgetComponent, "contributionM" | "varianceShare">[] = [
    {
      part: "transducer",
      type: "B",
      standardUncertainty: rectangularUncertainty(x.statedAccuracyM ?? DEFAULT_STATED_ACCURACY_M),
      unit: "m",
      sensitivity: 1,
      isDefault: x.statedAccuracyM === null,
    },
    { part: "air_temperature", type: "B", standardUncertainty: x.tempUncertaintyK, unit: "K", sensitivity: s * temperatureSensitivityMPerK(x.rawDistanceM, x.tempC), isDefault: false },
  ];
  if (x.tickUs !== null) parts.push({ part: "timer", type: "B", standardUncertainty: resolutionUncertainty(x.tickUs), unit: "µs", sensitivity: perUs, isDefault: false });
  if (x.burstSpreadUs !== null && x.burstN !== null && x.burstN >= 2) {
    parts.push({ part: "burst", type: "A", standardUncertainty: burstMedianUncertaintyUs(x.burstSpreadUs, x.burstN), unit: "µs", sensitivity: perUs, isDefault: false });
  }
  if (x.calibrationRmsM !== null) parts.push({ part: "calibration", type: "A", standardUncertainty: x.calibrationRmsM, unit: "m", sensitivity: 1, isDefault: false });
  const withContribution = parts.map((p) => ({ ...p, contributionM: p.sensitivity * p.standardUncertainty }));
  const variance = withContribution.reduce((sum, p) => sum + p.contributionM * p.contributionM, 0);
  const combinedM = Math.sqrt(variance);
  return {
    components: withContribution.map((p) => ({ ...p, varianceShare: variance > 0 ? (p.contributionM * p.contributionM) / variance : 0 })),
    combinedM,
    coverageFactor: COVERAGE_FACTOR,
    expandedM: COVERAGE_FACTOR * combinedM,
  };
}
