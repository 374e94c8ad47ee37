// Units people see: SI or US customary, converted from and to the SI the APIs and the database speak.
// Exact by definition (NIST SP 811, Appendix B; NIST Handbook 44, Appendix C): 1 in = 25.4 mm,
// 1 ft = 12 in = 0.3048 m, 1 US gal = 231 in³ = 3.785 411 784 L, T(°F) = T(°C)·9/5 + 32.

export type UnitSystem = "si" | "us";

export const LENGTH_UNITS = ["m", "cm", "mm", "ft", "in"] as const;
export const VOLUME_UNITS = ["L", "m3", "gal"] as const;
export const TEMPERATURE_UNITS = ["degC", "degF"] as const;
export type LengthUnit = (typeof LENGTH_UNITS)[number];
export type VolumeUnit = (typeof VOLUME_UNITS)[number];
export type TemperatureUnit = (typeof TEMPERATURE_UNITS)[number];
export type Unit = LengthUnit | VolumeUnit | TemperatureUnit;
export type Quantity = "length" | "volume" | "temperature";

export const METRES_PER_INCH = 0.0254;
export const METRES_PER_FOOT = 12 * METRES_PER_INCH;
/** 231 cubic inches, in litres (1 L = 1 dm³). */
export const LITRES_PER_US_GALLON = 231 * (METRES_PER_INCH * 10) ** 3;

/** SI base of each quantity as stored: metres, litres, degrees Celsius. */
const FACTOR_TO_SI: Record<LengthUnit | VolumeUnit, number> = {
  m: 1,
  cm: 0.01,
  mm: 0.001,
  ft: METRES_PER_FOOT,
  in: METRES_PER_INCH,
  L: 1,
  m3: 1000,
  gal: LITRES_PER_US_GALLON,
};

export function quantityOf(unit: Unit): Quantity {
  if ((LENGTH_UNITS as readonly string[]).includes(unit)) return "length";
  if ((VOLUME_UNITS as readonly string[]).includes(unit)) return "volume";
  return "temperature";
}

/** A value in `unit` → metres, litres or °C. */
export function toSi(value: number, unit: Unit): number {
  if (unit === "degC") return value;
  if (unit === "degF") return ((value - 32) * 5) / 9;
  return value * FACTOR_TO_SI[unit];
}

/** Metres, litres or °C → `unit`. */
export function fromSi(value: number, unit: Unit): number {
  if (unit === "degC") return value;
  if (unit === "degF") return (value * 9) / 5 + 32;
  return value / FACTOR_TO_SI[unit];
}

/**
 * A difference or an uncertainty carries no offset: 1 K is 1.8 °F of difference, 1 mm is 1/25.4 in.
 * Used for "± 0.9 °F", never for a temperature itself.
 */
export function differenceFromSi(value: number, unit: Unit): number {
  if (unit === "degC") return value;
  if (unit === "degF") return (value * 9) / 5;
  return value / FACTOR_TO_SI[unit];
}

export function convert(value: number, from: Unit, to: Unit): number {
  if (quantityOf(from) !== quantityOf(to)) throw new RangeError(`cannot convert ${from} to ${to}`);
  return fromSi(toSi(value, from), to);
}

/** What each kind of figure is shown in, by unit system. */
export interface DisplayUnits {
  /** Levels, distances, mounting heights. */
  level: LengthUnit;
  /** Uncertainties of a level, dips' differences. */
  fineLength: LengthUnit;
  volume: VolumeUnit;
  temperature: TemperatureUnit;
}

export const DISPLAY_UNITS: Record<UnitSystem, DisplayUnits> = {
  si: { level: "m", fineLength: "mm", volume: "L", temperature: "degC" },
  us: { level: "ft", fineLength: "in", volume: "gal", temperature: "degF" },
};

/** Symbol to print beside a value. */
export const UNIT_SYMBOLS: Record<Unit, string> = { m: "m", cm: "cm", mm: "mm", ft: "ft", in: "in", L: "L", m3: "m³", gal: "gal", degC: "°C", degF: "°F" };
