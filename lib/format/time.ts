// Every time a person reads, in one place: in a named IANA time zone (the site's, or the viewer's by
// choice), always labelled with that zone, one date format, one date-time format, relative ages, chart
// axis labels with day and month, and ISO 8601 with the zone's offset for exports. Built on Intl, so the
// tz database and the locale's conventions come from the runtime (Node's full ICU, the browser's).

export type HourCycle = "h12" | "h23";

export interface TimeDisplay {
  /** BCP 47 locale: month names, order of day and month. */
  locale: string;
  /** IANA zone the time is shown in, e.g. "Europe/Dublin". */
  timeZone: string;
  /** 12- or 24-hour clock; default: the locale's. */
  hourCycle?: HourCycle;
}

type Instant = Date | string | number;

const formatters = new Map<string, Intl.DateTimeFormat>();

// Intl formatters are costly to build and charts format hundreds of labels: keep one per option set.
function formatter(locale: string, options: Intl.DateTimeFormatOptions): Intl.DateTimeFormat {
  const key = `${locale}|${JSON.stringify(options)}`;
  let f = formatters.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat(locale, options);
    formatters.set(key, f);
  }
  return f;
}

function toDate(at: Instant): Date {
  const d = at instanceof Date ? at : new Date(at);
  if (Number.isNaN(d.getTime())) throw new RangeError(`not a time: ${String(at)}`);
  return d;
}

function clock(d: TimeDisplay): Intl.DateTimeFormatOptions {
  return d.hourCycle ? { hour: d.hourCycle === "h12" ? "numeric" : "2-digit", minute: "2-digit", hourCycle: d.hourCycle } : { hour: "2-digit", minute: "2-digit" };
}

const DATE_FIELDS: Intl.DateTimeFormatOptions = { day: "numeric", month: "short", year: "numeric" };

/** The zone's abbreviation at that instant as the locale writes it: "GMT", "IST", "CDT", "GMT+1". */
export function zoneAbbreviation(at: Instant, timeZone: string, locale: string): string {
  const parts = formatter(locale, { timeZone, timeZoneName: "short" }).formatToParts(toDate(at));
  return parts.find((p) => p.type === "timeZoneName")?.value ?? timeZone;
}

/** A place name for the zone from its IANA id: "Europe/Dublin" → "Dublin time", "UTC" → "UTC". */
export function zonePlaceLabel(timeZone: string): string {
  if (timeZone === "UTC" || timeZone === "Etc/UTC") return "UTC";
  const city = timeZone.split("/").pop() ?? timeZone;
  return `${city.replace(/_/g, " ")} time`;
}

/** "14:05 GMT" (or "2:05 PM GMT"). */
export function formatTime(at: Instant, d: TimeDisplay): string {
  return formatter(d.locale, { timeZone: d.timeZone, ...clock(d), timeZoneName: "short" }).format(toDate(at));
}

/** The one date format: "4 Dec 2026" (in the locale's order). A date is the zone's calendar day. */
export function formatDate(at: Instant, d: TimeDisplay): string {
  return formatter(d.locale, { timeZone: d.timeZone, ...DATE_FIELDS }).format(toDate(at));
}

/** The one date-time format: "4 Dec 2026, 14:05 GMT". */
export function formatDateTime(at: Instant, d: TimeDisplay): string {
  return formatter(d.locale, { timeZone: d.timeZone, ...DATE_FIELDS, ...clock(d), timeZoneName: "short" }).format(toDate(at));
}

const relativeFormatters = new Map<string, Intl.RelativeTimeFormat>();

/**
 * How long ago or how far ahead, in the unit a person reads at a glance: under a minute "now", then
 * minutes, hours up to two days, then days ("3 hours ago", "in 2 days").
 */
export function formatRelative(at: Instant, now: Instant, locale: string): string {
  let f = relativeFormatters.get(locale);
  if (!f) {
    f = new Intl.RelativeTimeFormat(locale, { numeric: "auto" });
    relativeFormatters.set(locale, f);
  }
  const seconds = (toDate(at).getTime() - toDate(now).getTime()) / 1000;
  const abs = Math.abs(seconds);
  // Whole units towards zero: 59 min 50 s is "59 minutes ago", not "1 hour ago".
  const whole = (unitS: number) => Math.trunc(seconds / unitS) || 0;
  if (abs < 60) return f.format(0, "second");
  if (abs < 3600) return f.format(whole(60), "minute");
  if (abs < 48 * 3600) return f.format(whole(3600), "hour");
  return f.format(whole(86_400), "day");
}

/** Offset of the zone from UTC at that instant, minutes (east positive): Dublin in summer +60. */
export function zoneOffsetMinutes(at: Instant, timeZone: string): number {
  const name = formatter("en-US", { timeZone, timeZoneName: "longOffset" }).formatToParts(toDate(at)).find((p) => p.type === "timeZoneName")?.value ?? "GMT";
  const m = /^GMT(?:([+-])(\d{2}):(\d{2}))?$/.exec(name.replace("\u2212", "-"));
  if (!m) throw new RangeError(`unexpected zone offset ${name}`);
  if (!m[1]) return 0;
  return (m[1] === "-" ? -1 : 1) * (Number(m[2]) * 60 + Number(m[3]));
}

const pad = (n: number, width = 2) => String(n).padStart(width, "0");

/** ISO 8601 local time with the zone's offset, for exports: "2026-03-29T02:30:00+01:00" (milliseconds when present). */
export function formatIsoWithOffset(at: Instant, timeZone: string): string {
  const date = toDate(at);
  const offset = zoneOffsetMinutes(date, timeZone);
  const local = new Date(date.getTime() + offset * 60_000);
  const ms = local.getUTCMilliseconds();
  const sign = offset < 0 ? "-" : "+";
  const abs = Math.abs(offset);
  return (
    `${pad(local.getUTCFullYear(), 4)}-${pad(local.getUTCMonth() + 1)}-${pad(local.getUTCDate())}` +
    `T${pad(local.getUTCHours())}:${pad(local.getUTCMinutes())}:${pad(local.getUTCSeconds())}${ms ? `.${pad(ms, 3)}` : ""}` +
    `${sign}${pad(Math.floor(abs / 60))}:${pad(abs % 60)}`
  );
}

const HOUR_MS = 3_600_000;

/**
 * A chart axis label. Over two days or more: day and month ("4 Dec"), never a bare day number. Shorter:
 * the time of day, with day and month at the zone's midnight. The zone goes in the axis title
 * (axisZoneTitle), not on every tick.
 */
export function formatAxisLabel(at: Instant, d: TimeDisplay, spanMs: number): string {
  const date = toDate(at);
  const dayMonth = formatter(d.locale, { timeZone: d.timeZone, day: "numeric", month: "short" });
  if (spanMs >= 48 * HOUR_MS) return dayMonth.format(date);
  const parts = formatter(d.locale, { timeZone: d.timeZone, hour: "2-digit", minute: "2-digit", hourCycle: "h23" }).formatToParts(date);
  const atMidnight = parts.find((p) => p.type === "hour")?.value === "00" && parts.find((p) => p.type === "minute")?.value === "00";
  return atMidnight ? dayMonth.format(date) : formatter(d.locale, { timeZone: d.timeZone, ...clock(d) }).format(date);
}

/** The axis title that says which zone the labels are in: "Dublin time (GMT)"; both names when they differ across the range. */
export function axisZoneTitle(from: Instant, to: Instant, d: TimeDisplay): string {
  const a = zoneAbbreviation(from, d.timeZone, d.locale);
  const b = zoneAbbreviation(to, d.timeZone, d.locale);
  return `${zonePlaceLabel(d.timeZone)} (${a === b ? a : `${a}/${b}`})`;
}
