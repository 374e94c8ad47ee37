// How the live screens write their figures: the unit beside every value, a value rounded to the
// precision its uncertainty allows, grouped digits, and the age of a value once it is overdue.
// Pure functions (no React, no I/O) shared by the overview, site, asset and device-health screens.

import { differenceInDays, differenceInHours, differenceInMinutes } from "date-fns";

const NBSP = "\u00a0";
const NARROW_NBSP = "\u202f";
const MINUS = "\u2212";

/**
 * Rounds an uncertainty after the Particle Data Group's rule: the three leading digits 100–354 keep
 * two significant digits, 355–949 one, 950–999 round up to 1000 and keep two. Returns the rounded
 * value and the number of decimals it has (negative for tens, hundreds…).
 */
export function roundUncertainty(u: number): { value: number; decimals: number } {
  if (!(u > 0) || !Number.isFinite(u)) throw new RangeError("an uncertainty must be a positive number");
  const exponent = Math.floor(Math.log10(u));
  const leading = Math.round(u / 10 ** (exponent - 2));
  // 999.5 and up rounds to 1000: the next power of ten, like the 950–999 case.
  if (leading >= 950) {
    const decimals = 1 - (exponent + 1);
    return { value: roundTo(10 ** (exponent + 1), decimals), decimals };
  }
  const decimals = (leading <= 354 ? 2 : 1) - 1 - exponent;
  return { value: roundTo(u, decimals), decimals };
}

/** Rounds to a number of decimals; a negative number rounds to tens, hundreds… */
export function roundTo(value: number, decimals: number): number {
  return decimals >= 0 ? Number(value.toFixed(decimals)) : Math.round(value / 10 ** -decimals) * 10 ** -decimals;
}

/** Digits in groups of three separated by a narrow no-break space, as the SI writes them. */
export function groupDigits(text: string): string {
  const negative = text.startsWith("-");
  const body = negative ? text.slice(1) : text;
  const [int, frac] = body.split(".");
  const grouped = int.length > 3 ? int.replace(/\B(?=(\d{3})+(?!\d))/g, NARROW_NBSP) : int;
  return `${negative ? MINUS : ""}${grouped}${frac !== undefined ? `.${frac}` : ""}`;
}

function fixed(value: number, decimals: number): string {
  const d = Math.max(0, decimals);
  const text = roundTo(value, decimals).toFixed(d);
  // "-0.000" is zero.
  return Number(text) === 0 ? (0).toFixed(d) : text;
}

// Finest and coarsest precision a distance is ever written with: 0.1 mm and 1 cm.
const MAX_DECIMALS_M = 4;
const MIN_DECIMALS_M = 2;

/** A length with its uncertainty: "1.842 m ± 6 mm"; without one, to the millimetre. */
export function formatMetres(m: number | null | undefined, uncertaintyM?: number | null): string {
  if (m == null || !Number.isFinite(m)) return "—";
  if (uncertaintyM == null || !(uncertaintyM > 0)) return `${groupDigits(fixed(m, 3))}${NBSP}m`;
  const u = roundUncertainty(uncertaintyM);
  const decimals = Math.min(MAX_DECIMALS_M, Math.max(MIN_DECIMALS_M, u.decimals));
  const uMm = u.value * 1000;
  const uText = fixed(uMm, Math.max(0, u.decimals - 3));
  return `${groupDigits(fixed(m, decimals))}${NBSP}m ±${NBSP}${uText}${NBSP}mm`;
}

/** Fill as a whole percentage: "63 %" (a fill is never read closer than that at a glance). */
export function formatPercent(pct: number | null | undefined): string {
  if (pct == null || !Number.isFinite(pct)) return "—";
  return `${fixed(pct, 0)}${NBSP}%`;
}

/** A volume to four significant figures and never finer than a litre: 12 483 → "12 480 L". */
export function formatLitres(litres: number | null | undefined): string {
  if (litres == null || !Number.isFinite(litres)) return "—";
  const magnitude = litres === 0 ? 0 : Math.floor(Math.log10(Math.abs(litres)));
  const decimals = Math.min(0, 3 - magnitude);
  return `${groupDigits(fixed(litres, decimals))}${NBSP}L`;
}

export function formatCelsius(c: number | null | undefined): string {
  if (c == null || !Number.isFinite(c)) return "—";
  return `${groupDigits(fixed(c, 1))}${NBSP}°C`;
}

export function formatVolts(v: number | null | undefined): string {
  if (v == null || !Number.isFinite(v)) return "—";
  return `${fixed(v, 2)}${NBSP}V`;
}

export function formatDbm(dbm: number | null | undefined): string {
  if (dbm == null || !Number.isFinite(dbm)) return "—";
  return `${groupDigits(fixed(dbm, 0))}${NBSP}dBm`;
}

/** How long ago, in the units a person reads at a glance: "14 min ago", "3 h ago", "2 d ago". */
export function formatAge(at: Date | string | number, now: Date | number = Date.now()): string {
  const then = new Date(at);
  const minutes = differenceInMinutes(now, then);
  if (minutes < 1) return "just now";
  if (minutes < 60) return `${minutes} min ago`;
  const hours = differenceInHours(now, then);
  if (hours < 48) return `${hours} h ago`;
  return `${differenceInDays(now, then)} d ago`;
}

/** A value is overdue once it is older than two of its device's expected reporting intervals. */
export function isOverdue(at: Date | string | number | null | undefined, expectedIntervalS: number, now: Date | number = Date.now()): boolean {
  if (at == null) return true;
  return new Date(now).getTime() - new Date(at).getTime() > 2 * expectedIntervalS * 1000;
}

/** The age to print beside a value: only when it is overdue, otherwise null. */
export function ageWhenOverdue(at: Date | string | number | null | undefined, expectedIntervalS: number, now: Date | number = Date.now()): string | null {
  if (at == null) return "no value yet";
  return isOverdue(at, expectedIntervalS, now) ? formatAge(at, now) : null;
}

/** Time in a state: "45 min", "2 h 14 min", "3 d 4 h". */
export function formatDuration(seconds: number): string {
  if (!(seconds >= 0)) return "—";
  const minutes = Math.floor(seconds / 60);
  if (minutes < 1) return "under a minute";
  if (minutes < 60) return `${minutes} min`;
  const hours = Math.floor(minutes / 60);
  if (hours < 24) return minutes % 60 ? `${hours} h ${minutes % 60} min` : `${hours} h`;
  const days = Math.floor(hours / 24);
  return hours % 24 ? `${days} d ${hours % 24} h` : `${days} d`;
}

/** Days until the reorder level (or another level: say what "now" means) as the screens say it. */
export function formatDaysToReorder(days: number | null | undefined, nowText = "reorder now"): string {
  if (days == null || !Number.isFinite(days)) return "no fall in level";
  if (days <= 0) return nowText;
  if (days < 1) return "within a day";
  const whole = Math.floor(days);
  return `in ${whole} ${whole === 1 ? "day" : "days"}`;
}
