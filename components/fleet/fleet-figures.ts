// How the live screens write their figures: the unit beside every value, a value rounded to the
// precision its uncertainty allows, grouped digits, and the age of a value once it is overdue.
// Pure functions (no React, no I/O) shared by the overview, site, asset and device-health screens.

import { formatLength, formatNumber, formatTemperature, formatVolume, type FigureOptions } from "@/lib/format/number";
import { COVERAGE_FACTOR } from "@/lib/uncertainty/budget";

const NBSP = "\u00a0";

// The organisation's units and locale are not threaded through every screen yet: SI in en-GB's
// decimal sign, the figures' digits from lib/format.
const SI: FigureOptions = { system: "si", locale: "en-GB" };

/**
 * A length with its expanded uncertainty U = k·u (the stored uncertainty is the standard one, k = 1):
 * "1.84 m ± 12 mm (k=2)", the value to the digits U supports; without one, to the millimetre.
 */
export function formatMetres(m: number | null | undefined, standardUncertaintyM?: number | null): string {
  if (m == null || !Number.isFinite(m)) return "—";
  if (standardUncertaintyM == null || !(standardUncertaintyM > 0)) return formatLength(m, null, SI);
  return `${formatLength(m, COVERAGE_FACTOR * standardUncertaintyM, SI)}${NBSP}(k=${COVERAGE_FACTOR})`;
}

/** Fill as a whole percentage: "63 %" (a fill is never read closer than that at a glance). */
export function formatPercent(pct: number | null | undefined): string {
  if (pct == null || !Number.isFinite(pct)) return "—";
  return `${formatNumber(pct, 0, SI.locale)}${NBSP}%`;
}

/** A volume to four significant figures and never finer than a litre: 12 483 → "12 480 L". */
export function formatLitres(litres: number | null | undefined): string {
  return formatVolume(litres, null, SI);
}

export function formatCelsius(c: number | null | undefined): string {
  return formatTemperature(c, SI);
}

export function formatVolts(v: number | null | undefined): string {
  if (v == null || !Number.isFinite(v)) return "—";
  return `${formatNumber(v, 2, SI.locale)}${NBSP}V`;
}

export function formatDbm(dbm: number | null | undefined): string {
  if (dbm == null || !Number.isFinite(dbm)) return "—";
  return `${formatNumber(dbm, 0, SI.locale)}${NBSP}dBm`;
}

/** A whole number with its thousands grouped as the SI writes them: "16 000 000". */
export function formatCount(n: number): string {
  return formatNumber(n, 0, SI.locale);
}

/** A value is overdue once it is older than two of its device's expected reporting intervals. */
export function isOverdue(at: Date | string | number | null | undefined, expectedIntervalS: number, now: Date | number = Date.now()): boolean {
  if (at == null) return true;
  return new Date(now).getTime() - new Date(at).getTime() > 2 * expectedIntervalS * 1000;
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
