// Figures as people read them: the locale's decimal sign, digits grouped in threes by a narrow no-break
// space (BIPM, SI Brochure 9th ed., §5.4.4: never a comma or a point, so "1 500,5" cannot be misread),
// the unit of their system beside the value, and no digit the uncertainty does not support.

import { roundToDecimals, roundUncertainty, type PrecisionOptions } from "./precision";
import { DISPLAY_UNITS, differenceFromSi, fromSi, UNIT_SYMBOLS, type Unit, type UnitSystem } from "../units/units";

const NBSP = "\u00a0";
const NARROW_NBSP = "\u202f";

const numberFormats = new Map<string, Intl.NumberFormat>();

function numberFormat(locale: string, decimals: number): Intl.NumberFormat {
  const key = `${locale}|${decimals}`;
  let f = numberFormats.get(key);
  if (!f) {
    f = new Intl.NumberFormat(locale, { minimumFractionDigits: decimals, maximumFractionDigits: decimals, useGrouping: true });
    numberFormats.set(key, f);
  }
  return f;
}

/** A number to a fixed number of decimals (negative: rounded to tens, hundreds…) in a locale. */
export function formatNumber(value: number, decimals: number, locale: string): string {
  const d = Math.max(0, decimals);
  const rounded = roundToDecimals(value, decimals);
  // "−0.000" is zero.
  const parts = numberFormat(locale, d).formatToParts(rounded === 0 ? 0 : rounded);
  const grouping = Math.abs(rounded) >= 1000;
  return parts
    .map((p) => {
      if (p.type === "group") return grouping ? NARROW_NBSP : "";
      if (p.type === "minusSign") return "\u2212";
      return p.value;
    })
    .join("");
}

export interface FigureOptions extends PrecisionOptions {
  system: UnitSystem;
  locale: string;
}

function withUnit(text: string, unit: Unit): string {
  return `${text}${NBSP}${UNIT_SYMBOLS[unit]}`;
}

/**
 * A level or distance with its uncertainty, in the system's units: "2.001 m ± 8 mm", "6.566 ft ± 0.31 in".
 * The value carries the decimal place of the rounded uncertainty expressed in the value's own unit.
 * Without an uncertainty: to the millimetre (0.01 ft in US units, 3 mm), marked by no "±".
 */
export function formatLength(valueM: number | null | undefined, uncertaintyM: number | null | undefined, o: FigureOptions): string {
  if (valueM == null || !Number.isFinite(valueM)) return "—";
  const units = DISPLAY_UNITS[o.system];
  const value = fromSi(valueM, units.level);
  if (uncertaintyM == null || !(uncertaintyM > 0)) return withUnit(formatNumber(value, o.system === "si" ? 3 : 2, o.locale), units.level);
  const inValueUnit = roundUncertainty(differenceFromSi(uncertaintyM, units.level), o);
  const fine = roundUncertainty(differenceFromSi(uncertaintyM, units.fineLength), o);
  return `${withUnit(formatNumber(value, inValueUnit.decimals, o.locale), units.level)} ±${NBSP}${withUnit(formatNumber(fine.value, fine.decimals, o.locale), units.fineLength)}`;
}

/** A volume: to its uncertainty when known, otherwise four significant figures and never finer than 1 L or 0.1 gal. */
export function formatVolume(litres: number | null | undefined, uncertaintyL: number | null | undefined, o: FigureOptions): string {
  if (litres == null || !Number.isFinite(litres)) return "—";
  const unit = DISPLAY_UNITS[o.system].volume;
  const value = fromSi(litres, unit);
  if (uncertaintyL != null && uncertaintyL > 0) {
    const u = roundUncertainty(differenceFromSi(uncertaintyL, unit), o);
    return `${withUnit(formatNumber(value, u.decimals, o.locale), unit)} ±${NBSP}${withUnit(formatNumber(u.value, u.decimals, o.locale), unit)}`;
  }
  const magnitude = value === 0 ? 0 : Math.floor(Math.log10(Math.abs(value)));
  const decimals = Math.min(unit === "L" ? 0 : 1, 3 - magnitude);
  return withUnit(formatNumber(value, decimals, o.locale), unit);
}

/** An air temperature to a tenth of a degree in the system's scale. */
export function formatTemperature(celsius: number | null | undefined, o: Pick<FigureOptions, "system" | "locale">): string {
  if (celsius == null || !Number.isFinite(celsius)) return "—";
  const unit = DISPLAY_UNITS[o.system].temperature;
  return withUnit(formatNumber(fromSi(celsius, unit), 1, o.locale), unit);
}

/** A count's noun in English: "tank" for 1, "tanks" otherwise. */
export function plural(count: number, singular: string, pluralForm = `${singular}s`): string {
  return count === 1 ? singular : pluralForm;
}
