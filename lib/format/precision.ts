// Display precision from uncertainty (GUM, JCGM 100:2008, §7.2.2 and §7.2.6): an uncertainty is quoted
// to one or two significant digits, and the value to the same decimal place. Which of the two: the
// three leading digits 100–354 keep two, 355–949 one, 950–999 round up to the next power of ten with
// two (the Particle Data Group's rule, common practice in physics). The GUM adds that rounding an
// uncertainty up rather than to the nearest digit may be appropriate, "but common sense should
// prevail" (28.05 kHz goes to 28 kHz): "up" below rounds up unless the dropped part is under a tenth
// of the last digit kept (own threshold for that common sense).

export type SignificantDigits = 1 | 2 | "auto";

export interface PrecisionOptions {
  /** Significant digits of the uncertainty; "auto" (default) follows the 354 rule above. */
  significantDigits?: SignificantDigits;
  /** "nearest" (default) or "up" (GUM §7.2.6). */
  direction?: "nearest" | "up";
}

export interface RoundedUncertainty {
  /** The rounded uncertainty. */
  value: number;
  /** Decimal places it has; negative for tens, hundreds… */
  decimals: number;
  significantDigits: 1 | 2;
}

export interface RoundedMeasurement {
  value: number;
  uncertainty: number;
  /** Decimal places both are written with (negative: the value is rounded to tens, hundreds…). */
  decimals: number;
}

/** Rounds to a number of decimals; a negative number rounds to tens, hundreds… */
export function roundToDecimals(value: number, decimals: number): number {
  if (decimals >= 0) return Number(value.toFixed(Math.min(decimals, 100)));
  const step = 10 ** -decimals;
  return Math.round(value / step) * step;
}

// Relative slack so that 0.35 (stored as 0.34999…) counts as 35 hundredths, not 34.999…
const EPSILON = 1e-9;

function roundDigits(u: number, digits: 1 | 2, direction: "nearest" | "up"): { value: number; decimals: number } {
  const exponent = Math.floor(Math.log10(u) + EPSILON);
  const decimals = digits - 1 - exponent;
  const scaled = u * 10 ** decimals;
  let units: number;
  if (direction === "nearest") units = Math.round(scaled + EPSILON);
  else units = scaled - Math.floor(scaled + EPSILON) < 0.1 ? Math.round(scaled) : Math.ceil(scaled - EPSILON);
  // 9.6 → 10 needs one decimal fewer to keep the same number of digits.
  if (units >= 10 ** digits) return { value: roundToDecimals(units / 10 ** decimals, decimals - 1), decimals: decimals - 1 };
  return { value: roundToDecimals(units / 10 ** decimals, decimals), decimals };
}

/** An uncertainty rounded to the significant digits it is quoted with. */
export function roundUncertainty(u: number, options: PrecisionOptions = {}): RoundedUncertainty {
  if (!(u > 0) || !Number.isFinite(u)) throw new RangeError("an uncertainty must be a positive finite number");
  const direction = options.direction ?? "nearest";
  if (options.significantDigits === 1 || options.significantDigits === 2) {
    return { ...roundDigits(u, options.significantDigits, direction), significantDigits: options.significantDigits };
  }
  const exponent = Math.floor(Math.log10(u) + EPSILON);
  const leading = Math.round(u / 10 ** (exponent - 2));
  // 950–999 (and 999.5 up) becomes the next power of ten, written with two digits: 0.98 → 1.0.
  if (leading >= 950) return { value: 10 ** (exponent + 1), decimals: -exponent, significantDigits: 2 };
  const digits = leading <= 354 ? 2 : 1;
  return { ...roundDigits(u, digits, direction), significantDigits: digits };
}

/** A value and its (standard or expanded) uncertainty, both to the decimal place the uncertainty supports. */
export function roundMeasurement(value: number, u: number, options: PrecisionOptions = {}): RoundedMeasurement {
  const r = roundUncertainty(u, options);
  return { value: roundToDecimals(value, r.decimals), uncertainty: r.value, decimals: r.decimals };
}
