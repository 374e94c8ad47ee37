// Speed of sound in air, for turning an echo time into a distance.
// Formulas and coefficients: REFERENCES.md (shared) §1.

const KELVIN_OFFSET = 273.15;

/** Ideal-gas "practical formula" for dry air (γ = 1.4), the product's default model. */
export function speedOfSoundDry(tempC: number): number {
  return 331.3 * Math.sqrt(1 + tempC / KELVIN_OFFSET);
}

/** ISO 9613-1:1993 Annex A (A.5), referenced to 343.2 m/s at 20 °C; valid −20…+50 °C. */
export function speedOfSoundIso9613(tempC: number): number {
  return 343.2 * Math.sqrt((tempC + KELVIN_OFFSET) / 293.15);
}

// Davis (1992) saturation vapour pressure over water, Pa (T in kelvin).
const DAVIS_A = 1.2378847e-5;
const DAVIS_B = -1.9121316e-2;
const DAVIS_C = 33.93711047;
const DAVIS_D = -6.3431645e3;

/** Saturation vapour pressure of water, Pa, after Davis (1992), Metrologia 29:67. */
export function saturationVapourPressurePa(tempC: number): number {
  const t = tempC + KELVIN_OFFSET;
  return Math.exp(DAVIS_A * t * t + DAVIS_B * t + DAVIS_C + DAVIS_D / t);
}

/** Enhancement factor of water vapour in air, Davis (1992). */
export function enhancementFactor(tempC: number, pressurePa: number): number {
  return 1.00062 + 3.14e-8 * pressurePa + 5.6e-7 * tempC * tempC;
}

/** Mole fraction of water vapour in moist air, Davis (1992). */
export function waterVapourMoleFraction(tempC: number, relativeHumidityPct: number, pressurePa: number): number {
  const rh = relativeHumidityPct / 100;
  return (rh * enhancementFactor(tempC, pressurePa) * saturationVapourPressurePa(tempC)) / pressurePa;
}

// Cramer (1993) p. 2514, a0…a15. The signs of a13–a15 are as printed: a common port flips them,
// which shifts dry air at 0 °C by about +0.004 m/s (the tests would catch it).
const CRAMER = [
  331.5024, 0.603055, -0.000528, 51.471935, 0.1495874, -0.000782, -1.82e-7, 3.73e-8, -2.93e-10, -85.20931,
  -0.228525, 5.91e-5, -2.835149, -2.15e-13, 29.179762, 0.000486,
] as const;

export const CRAMER_MIN_TEMP_C = 0;
export const CRAMER_MAX_TEMP_C = 30;

export interface CramerInput {
  tempC: number;
  relativeHumidityPct: number;
  pressurePa?: number;
  co2ppm?: number;
}

/**
 * Speed of sound in humid air with CO₂, Cramer (1993), J. Acoust. Soc. Am. 93(5):2510–2516.
 * Published as valid for 0–30 °C and 75–102 kPa; the caller decides what to do outside that.
 */
export function speedOfSoundCramer({ tempC, relativeHumidityPct, pressurePa = 101325, co2ppm = 400 }: CramerInput): number {
  const t = tempC;
  const p = pressurePa;
  const xw = waterVapourMoleFraction(tempC, relativeHumidityPct, pressurePa);
  const xc = co2ppm * 1e-6;
  const a = CRAMER;
  return (
    a[0] + a[1] * t + a[2] * t * t +
    (a[3] + a[4] * t + a[5] * t * t) * xw +
    (a[6] + a[7] * t + a[8] * t * t) * p +
    (a[9] + a[10] * t + a[11] * t * t) * xc +
    a[12] * xw * xw + a[13] * p * p + a[14] * xc * xc + a[15] * xw * p * xc
  );
}

export type SpeedOfSoundModel = "dry" | "cramer";

export interface SpeedOfSoundChoice {
  speedMs: number;
  model: SpeedOfSoundModel;
}

/**
 * The speed the worker uses for a reading: Cramer when a plausible relative humidity is known and the
 * temperature is inside Cramer's published range, otherwise the dry-air formula.
 */
export function speedOfSoundFor({ tempC, humidityPct }: { tempC: number; humidityPct?: number | null }): SpeedOfSoundChoice {
  const humidityUsable =
    humidityPct !== undefined && humidityPct !== null && Number.isFinite(humidityPct) && humidityPct >= 0 && humidityPct <= 100;
  if (humidityUsable && tempC >= CRAMER_MIN_TEMP_C && tempC <= CRAMER_MAX_TEMP_C) {
    return { speedMs: speedOfSoundCramer({ tempC, relativeHumidityPct: humidityPct }), model: "cramer" };
  }
  return { speedMs: speedOfSoundDry(tempC), model: "dry" };
}
