// Standard uncertainty of the air temperature a distance was converted with, by where it came from
// (the precedence of PRODUCT.md: the reading's own sensor, the site's samples, the site's fixed value,
// the 20 °C default). The base values per source are the product's own judgement; site samples add
// what interpolating between them, or reaching to the nearest one, may miss.

import { rectangularUncertainty } from "./budget";

/** Standard uncertainty of the air temperature by source, kelvin (own choice, engineering judgement). */
export const AIR_TEMPERATURE_UNCERTAINTY_K = { reading: 0.5, site_samples: 1, site_fixed: 5, default: 10 } as const;

/**
 * How fast air temperature may change, K an hour, when a sample is reached to rather than interpolated:
 * a daily swing of about 10 K happens over a few hours, so about 3 K an hour at its steepest (own choice,
 * common practice for outdoor air).
 */
export const AIR_TEMPERATURE_DRIFT_K_PER_H = 3;

export type AirTemperatureDoubt =
  | { source: "reading" }
  | {
      source: "site_samples";
      /** |difference| between the two samples interpolated between (0 when only the nearest was used). */
      spreadK: number;
      /** Time from the reading to the nearest sample used, seconds (0 when bracketed by samples). */
      ageS: number;
    }
  | { source: "site_fixed" }
  | { source: "default" };

export function airTemperatureUncertaintyK(doubt: AirTemperatureDoubt): number {
  const base = AIR_TEMPERATURE_UNCERTAINTY_K[doubt.source];
  if (doubt.source !== "site_samples") return base;
  // Between two samples the true course is anywhere within half their difference of the straight line
  // (rectangular); away from the nearest sample it may have drifted by up to rate·age (rectangular).
  const interpolation = rectangularUncertainty(Math.abs(doubt.spreadK) / 2);
  const age = rectangularUncertainty((AIR_TEMPERATURE_DRIFT_K_PER_H * Math.max(0, doubt.ageS)) / 3600);
  return Math.sqrt(base * base + interpolation * interpolation + age * age);
}
