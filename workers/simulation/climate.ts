import { gaussianAt, seedFromText } from "./random";
import type { SimSite } from "./keys-file";

const HOUR_MS = 3_600_000;
const DAY_MS = 24 * HOUR_MS;

const formatters = new Map<string, Intl.DateTimeFormat>();
const offsets = new Map<string, number>();

function formatterFor(timeZone: string): Intl.DateTimeFormat {
  let f = formatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat("en-GB", { timeZone, hourCycle: "h23", year: "numeric", month: "numeric", day: "numeric", hour: "numeric", minute: "numeric", second: "numeric" });
    formatters.set(timeZone, f);
  }
  return f;
}

/** Offset of local time from UTC in a time zone at an instant, ms (cached per zone and hour: zones change on the hour). */
export function timeZoneOffsetMs(tMs: number, timeZone: string): number {
  const key = `${timeZone}:${Math.floor(tMs / HOUR_MS)}`;
  const cached = offsets.get(key);
  if (cached !== undefined) return cached;
  const parts = Object.fromEntries(formatterFor(timeZone).formatToParts(new Date(tMs)).map((p) => [p.type, p.value]));
  const asUtc = Date.UTC(Number(parts.year), Number(parts.month) - 1, Number(parts.day), Number(parts.hour), Number(parts.minute), Number(parts.second));
  const offset = Math.round((asUtc - Math.floor(tMs / 1000) * 1000) / 60_000) * 60_000;
  if (offsets.size > 20_000) offsets.clear();
  offsets.set(key, offset);
  return offset;
}

/** Local clock time as fractional hours 0 … 24. */
export function localHour(tMs: number, timeZone: string): number {
  const local = tMs + timeZoneOffsetMs(tMs, timeZone);
  return (((local % DAY_MS) + DAY_MS) % DAY_MS) / HOUR_MS;
}

/** Start of the local calendar day containing tMs, as a UTC instant (ms). */
export function localDayStart(tMs: number, timeZone: string): number {
  const offset = timeZoneOffsetMs(tMs, timeZone);
  return Math.floor((tMs + offset) / DAY_MS) * DAY_MS - offset;
}

const WARMEST_HOUR = 15;
const WEATHER_PERIOD_DAYS = 5.3;
const WEATHER_SWING_C = 2.5;

/**
 * The demo's air temperature at a site: a daily cycle (coldest around 03:00, warmest around 15:00 local),
 * a slower swing of a few days standing in for the weather, and a little turbulence.
 */
export function airTemperatureC(site: SimSite, tMs: number): number {
  const hour = localHour(tMs, site.time_zone);
  const daily = (site.daily_swing_c / 2) * Math.cos((2 * Math.PI * (hour - WARMEST_HOUR)) / 24);
  const seed = seedFromText(site.id);
  const weather = WEATHER_SWING_C * Math.sin((2 * Math.PI * tMs) / (WEATHER_PERIOD_DAYS * DAY_MS) + (seed % 628) / 100);
  const turbulence = 0.15 * gaussianAt(seed, Math.floor(tMs / 60_000));
  return site.mean_temp_c + daily + weather + turbulence;
}

/** Share of full sunshine 0 … 1 at a local hour (a half sine from 06:00 to 20:00), for solar charging. */
export function daylight(hour: number): number {
  return hour > 6 && hour < 20 ? Math.sin((Math.PI * (hour - 6)) / 14) : 0;
}
