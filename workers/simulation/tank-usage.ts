import { levelForVolume, tankCapacity, type TankGeometry } from "../../lib/geometry/tank-volume";
import { localHour } from "./climate";
import type { TankUsage } from "./keys-file";

const DAY_MS = 86_400_000;
const MINUTE_MS = 60_000;
// Use peaks in the early afternoon and is lowest at night: rate = mean · (1 + A·sin(2π(h − 7)/24)).
const DAILY_AMPLITUDE = 0.7;
const PEAK_SHIFT_HOURS = 7;

/**
 * Percent of capacity used since the epoch: the integral of the daily use pattern. It only ever rises
 * (A < 1), so each refill point can be found from it.
 */
export function cumulativeUsePct(usage: TankUsage, tMs: number, timeZone: string): number {
  const days = tMs / DAY_MS;
  const hour = localHour(tMs, timeZone);
  return usage.use_pct_per_day * (days - (DAILY_AMPLITUDE / (2 * Math.PI)) * Math.cos((2 * Math.PI * (hour - PEAK_SHIFT_HOURS)) / 24));
}

function cyclePosition(usage: TankUsage, tMs: number, timeZone: string): number {
  const range = usage.refill_to_pct - usage.refill_below_pct;
  return cumulativeUsePct(usage, tMs, timeZone) / range + usage.phase;
}

/** The fill a tank would show at tMs if refills were instant: a saw-tooth between refill_to and refill_below. */
function drawnDownFillPct(usage: TankUsage, tMs: number, timeZone: string): number {
  const range = usage.refill_to_pct - usage.refill_below_pct;
  const position = cyclePosition(usage, tMs, timeZone);
  return usage.refill_to_pct - (position - Math.floor(position)) * range;
}

/**
 * Fill, % of capacity by volume, at any time: drawn down by use and refilled once it reaches
 * refill_below, the refill ramping up over refill_minutes (a delivery or a pump run). A sump is the
 * mirror image: it fills from refill_below to refill_to and is pumped out over refill_minutes.
 */
export function tankFillPct(usage: TankUsage, tMs: number, timeZone: string): number {
  const fill = drawnDownWithRefills(usage, tMs, timeZone);
  return usage.fills ? usage.refill_below_pct + usage.refill_to_pct - fill : fill;
}

function drawnDownWithRefills(usage: TankUsage, tMs: number, timeZone: string): number {
  const rampMs = usage.refill_minutes * MINUTE_MS;
  const now = drawnDownFillPct(usage, tMs, timeZone);
  const cycle = Math.floor(cyclePosition(usage, tMs, timeZone));
  if (rampMs <= 0 || Math.floor(cyclePosition(usage, tMs - rampMs, timeZone)) === cycle) return now;
  // A refill point lies within the last rampMs: find it by bisection and ramp from refill_below.
  let lo = tMs - rampMs;
  let hi = tMs;
  for (let i = 0; i < 30; i++) {
    const mid = (lo + hi) / 2;
    if (Math.floor(cyclePosition(usage, mid, timeZone)) === cycle) hi = mid;
    else lo = mid;
  }
  const progress = (tMs - hi) / rampMs;
  return usage.refill_below_pct + (now - usage.refill_below_pct) * progress;
}

/**
 * The fill the scenario plays at tMs: tankFillPct, except for a tank with a late delivery. Its fill is
 * then capped by a draw-down that reaches fill_at_first_run_pct at the first run (a line in cumulative
 * use, so it bends with the daily pattern like any draw-down); the cap starts above 100 % long before,
 * so it joins the ordinary saw-tooth without a jump, and the delivery ramps back to it over refill_minutes.
 */
export function scenarioFillPct(usage: TankUsage, tMs: number, timeZone: string, firstRunMs: number | null): number {
  const base = tankFillPct(usage, tMs, timeZone);
  const late = usage.late_delivery;
  if (!late || firstRunMs === null) return base;
  const atFirstRun = cumulativeUsePct(usage, firstRunMs, timeZone);
  const capped = (t: number) => Math.min(tankFillPct(usage, t, timeZone), late.fill_at_first_run_pct + atFirstRun - cumulativeUsePct(usage, t, timeZone));
  const arrivesMs = firstRunMs + late.arrives_hours_after_first_run * 60 * MINUTE_MS;
  if (tMs < arrivesMs) return capped(tMs);
  const rampMs = usage.refill_minutes * MINUTE_MS;
  if (tMs >= arrivesMs + rampMs) return base;
  const from = capped(arrivesMs);
  return from + ((base - from) * (tMs - arrivesMs)) / rampMs;
}

/** Liquid level, m from the lowest point, for a fill in % of capacity. */
export function levelForFillPct(geometry: TankGeometry, fillPct: number): number {
  return levelForVolume(geometry, (tankCapacity(geometry) * fillPct) / 100);
}
