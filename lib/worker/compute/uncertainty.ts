// Standard uncertainty (1σ) of a distance, combined in quadrature from independent parts as the GUM
// does (JCGM 100:2008, §5.1): timer resolution, air temperature, and the spread of a burst.

const KELVIN_OFFSET = 273.15;
// Asymptotic standard error of a sample median is √(π/2)·σ/√n for normal data (the median's 64 %
// efficiency, e.g. Kendall & Stuart); 1.4826·MAD estimates σ.
const MEDIAN_SE_FACTOR = Math.sqrt(Math.PI / 2);
const MAD_TO_SIGMA = 1.4826;

/** A quantisation step q read as a rectangular distribution has σ = q/√12 (GUM §4.3.7). */
export function quantisationUncertainty(stepM: number): number {
  return stepM / Math.sqrt(12);
}

/**
 * Distance error from an air-temperature error: c ∝ √T_K, so δc/c = δT/(2·T_K) and the distance,
 * proportional to c, moves by the same fraction.
 */
export function temperatureUncertainty(distanceM: number, tempC: number, tempUncertaintyK: number): number {
  return Math.abs(distanceM) * tempUncertaintyK / (2 * (tempC + KELVIN_OFFSET));
}

/** Uncertainty of a burst's median distance from its MAD (µs) over n pings, at speed c. */
export function burstUncertainty(spreadUs: number, n: number, speedMs: number): number {
  if (n < 2) return 0;
  const sigmaM = MAD_TO_SIGMA * spreadUs * 1e-6 * speedMs / 2;
  return MEDIAN_SE_FACTOR * sigmaM / Math.sqrt(n);
}

export function combineInQuadrature(parts: readonly number[]): number {
  return Math.sqrt(parts.reduce((sum, p) => sum + p * p, 0));
}
