// Alarm-system performance over a period, each figure beside its ISA-18.2 / EEMUA 191 / IEC 62682
// benchmark (REFERENCES.md §4) so a page can show value, target, source and verdict together.
// The benchmarks are per operator position: pass the activations of one position (one desk or one
// team's sites), and a period of 30 days or more for a fair comparison.

import { type AlarmPriority, type Instant, instantToMs } from "./state-machine";

export interface AlarmActivation {
  /** Which alarm (asset + setpoint, channel + health flag…): repeated activations share a key. */
  alarmKey: string;
  /** When it became active. */
  at: Instant;
  priority: AlarmPriority;
  /** When its condition cleared; absent or null while still active. */
  activeUntil?: Instant | null;
}

export interface HealthPeriod {
  from: Instant;
  to: Instant;
}

export type BenchmarkVerdict = "within" | "manageable" | "exceeds" | "no_data";

export interface Benchmark {
  /** How value compares with the thresholds: ≤, <, or ≥ (at_least: higher is better). */
  comparison: "at_most" | "below" | "at_least";
  /** The "very likely acceptable" (or single target) threshold. */
  acceptable: number;
  /** The "maximum manageable" threshold where the source gives one. */
  manageable: number | null;
  unit: string;
  /** The benchmark in words, as REFERENCES.md §4 states it. */
  text: string;
}

export interface BenchmarkedMetric {
  value: number | null;
  benchmark: Benchmark;
  /** Where the benchmark comes from, as REFERENCES.md §4 tags it. */
  source: string;
  verdict: BenchmarkVerdict;
}

export interface FloodPeriod {
  start: string;
  /** When the rate fell below the end threshold, or the period's end for a flood still going. */
  end: string;
  ongoing: boolean;
  /** Activations from the window that started the flood to its end. */
  alarmCount: number;
  /** Most activations in any 10-min window during the flood. */
  peakPer10Min: number;
}

export interface ChatteringAlarm {
  alarmKey: string;
  /** Most activations of this alarm inside one minute. */
  maxPerMinute: number;
  activations: number;
}

export interface StaleAlarm {
  alarmKey: string;
  activeSince: string;
  /** Active hours up to its clearing or to the period's end. */
  activeHours: number;
  stillActive: boolean;
}

export interface TopAlarm {
  alarmKey: string;
  count: number;
  /** Percentage of all activations in the period. */
  sharePct: number;
}

export interface AlarmHealthReport {
  from: string;
  to: string;
  periodDays: number;
  /** The benchmarks are stated over 30 days or more. */
  periodLongEnough: boolean;
  totalActivations: number;
  metrics: {
    averagePer10Min: BenchmarkedMetric;
    averagePerHour: BenchmarkedMetric;
    peakPer10Min: BenchmarkedMetric;
    averagePerDay: BenchmarkedMetric;
    averagePerDayIec: BenchmarkedMetric;
    timeInFloodPct: BenchmarkedMetric;
    chatteringAlarms: BenchmarkedMetric;
    staleMaxPerDay: BenchmarkedMetric;
    top10SharePct: BenchmarkedMetric;
    priorityLowPct: BenchmarkedMetric;
    priorityMediumPct: BenchmarkedMetric;
    /** Halftrip's critical and high together, against the benchmark's single high band. */
    priorityHighPct: BenchmarkedMetric;
  };
  floods: FloodPeriod[];
  chattering: ChatteringAlarm[];
  stale: StaleAlarm[];
  top10: TopAlarm[];
  /** Activations per 24-hour slice counted from the period's start. */
  daily: { dayStart: string; count: number }[];
  priorityCounts: Record<AlarmPriority, number>;
}

/** The source tags of REFERENCES.md §4, verbatim. */
export const BENCHMARK_SOURCES = {
  isaEemua: "ISA-18.2 / EEMUA 191 [published, via secondary sources]",
  iec: "IEC 62682 [published, via secondary sources]",
} as const;

const MINUTE_MS = 60_000;
const TEN_MIN_MS = 10 * MINUTE_MS;
const HOUR_MS = 60 * MINUTE_MS;
const DAY_MS = 24 * HOUR_MS;

/** A flood starts above this many activations in 10 min… (REFERENCES.md §4: more than 10 in 10 min). */
export const FLOOD_START_ABOVE_PER_10_MIN = 10;
/** …and ends when fewer than this many remain in the trailing 10 min (REFERENCES.md §4: below ~5). */
export const FLOOD_END_BELOW_PER_10_MIN = 5;
/** Chattering: this many activations of one alarm within one minute (REFERENCES.md §4: 3 or more in 1 min). */
export const CHATTER_ACTIVATIONS_PER_MINUTE = 3;
/** Stale: active longer than this (REFERENCES.md §4: over 24 h). */
export const STALE_AFTER_HOURS = 24;

const BENCHMARKS = {
  per10Min: {
    comparison: "at_most",
    acceptable: 1,
    manageable: 2,
    unit: "alarms / 10 min",
    text: "~1 per 10 min very likely acceptable, ~2 maximum manageable",
  },
  perHour: {
    comparison: "at_most",
    acceptable: 6,
    manageable: 12,
    unit: "alarms / h",
    text: "~6 alarms an hour very likely acceptable, ~12 maximum manageable",
  },
  peakPer10Min: {
    comparison: "at_most",
    acceptable: FLOOD_START_ABOVE_PER_10_MIN,
    manageable: null,
    unit: "alarms / 10 min",
    text: "more than 10 alarms in 10 min is a flood",
  },
  perDay: {
    comparison: "at_most",
    acceptable: 150,
    manageable: 300,
    unit: "alarms / day",
    text: "~150 a day very likely acceptable, ~300 maximum manageable",
  },
  perDayIec: {
    comparison: "at_most",
    acceptable: 144,
    manageable: 288,
    unit: "alarms / day",
    text: "~144 a day very likely acceptable, ~288 maximum manageable",
  },
  timeInFlood: {
    comparison: "below",
    acceptable: 1,
    manageable: null,
    unit: "% of time",
    text: "time in flood < ~1 %",
  },
  chattering: {
    comparison: "at_most",
    acceptable: 0,
    manageable: null,
    unit: "alarms",
    text: "chattering (3 or more activations in 1 min): target zero",
  },
  stale: {
    comparison: "below",
    acceptable: 5,
    manageable: null,
    unit: "alarms on the worst day",
    text: "stale (active over 24 h): fewer than 5 on any day",
  },
  top10: {
    comparison: "below",
    acceptable: 1,
    manageable: 5,
    unit: "% of activations",
    text: "top-10 alarms < ~1–5 % of the load",
  },
  priorityLow: {
    comparison: "at_least",
    acceptable: 80,
    manageable: null,
    unit: "% of activations",
    text: "priority mix ~80 / 15 / 5 % low / medium / high",
  },
  priorityMedium: {
    comparison: "at_most",
    acceptable: 15,
    manageable: null,
    unit: "% of activations",
    text: "priority mix ~80 / 15 / 5 % low / medium / high",
  },
  priorityHigh: {
    comparison: "at_most",
    acceptable: 5,
    manageable: null,
    unit: "% of activations",
    text: "priority mix ~80 / 15 / 5 % low / medium / high",
  },
} as const satisfies Record<string, Benchmark>;

function passes(value: number, threshold: number, comparison: Benchmark["comparison"]): boolean {
  if (comparison === "at_most") return value <= threshold;
  if (comparison === "below") return value < threshold;
  return value >= threshold;
}

/** Verdict of a value against a benchmark: within the acceptable threshold, within the manageable one, or beyond. */
export function judgeAgainstBenchmark(value: number | null, benchmark: Benchmark): BenchmarkVerdict {
  if (value === null) return "no_data";
  if (passes(value, benchmark.acceptable, benchmark.comparison)) return "within";
  if (benchmark.manageable !== null && passes(value, benchmark.manageable, benchmark.comparison)) return "manageable";
  return "exceeds";
}

function metric(value: number | null, benchmark: Benchmark, source: string = BENCHMARK_SOURCES.isaEemua): BenchmarkedMetric {
  return { value, benchmark, source, verdict: judgeAgainstBenchmark(value, benchmark) };
}

/**
 * Sweeps the trailing 10-min count N(t) = activations in (t − 10 min, t] over the period: its peak,
 * and the floods (start when N exceeds 10, end when N falls below 5). All changes at one instant are
 * applied before N is read, so an activation and an expiry at the same moment cancel.
 */
export function sweepTenMinuteWindows(times: readonly number[], toMs: number): { peak: number; floods: FloodPeriod[] } {
  const changes = new Map<number, number>();
  for (const t of times) {
    changes.set(t, (changes.get(t) ?? 0) + 1);
    changes.set(t + TEN_MIN_MS, (changes.get(t + TEN_MIN_MS) ?? 0) - 1);
  }
  const instants = [...changes.keys()].sort((a, b) => a - b);
  const floods: FloodPeriod[] = [];
  let count = 0;
  let peak = 0;
  let floodStart: number | null = null;
  let floodPeak = 0;
  const closeFlood = (start: number, endMs: number, ongoing: boolean) => {
    const alarmCount = times.filter((t) => t > start - TEN_MIN_MS && t < endMs).length;
    floods.push({
      start: new Date(start).toISOString(),
      end: new Date(endMs).toISOString(),
      ongoing,
      alarmCount,
      peakPer10Min: floodPeak,
    });
  };
  for (const t of instants) {
    // Only expiries fall at or after the period's end; what happens then is outside the period.
    if (t >= toMs) {
      if (floodStart !== null) closeFlood(floodStart, toMs, true);
      break;
    }
    count += changes.get(t) ?? 0;
    peak = Math.max(peak, count);
    if (floodStart === null) {
      if (count > FLOOD_START_ABOVE_PER_10_MIN) {
        floodStart = t;
        floodPeak = count;
      }
    } else {
      floodPeak = Math.max(floodPeak, count);
      if (count < FLOOD_END_BELOW_PER_10_MIN) {
        closeFlood(floodStart, t, false);
        floodStart = null;
      }
    }
  }
  return { peak, floods };
}

/** Most activations within any one-minute window [t, t + 1 min) of sorted times. */
function maxInOneMinute(sorted: readonly number[]): number {
  let best = 0;
  let first = 0;
  for (let last = 0; last < sorted.length; last++) {
    while (sorted[last] - sorted[first] >= MINUTE_MS) first++;
    best = Math.max(best, last - first + 1);
  }
  return best;
}

function percentage(part: number, whole: number): number | null {
  return whole === 0 ? null : (100 * part) / whole;
}

/**
 * Alarm-system health of one operator position over a period. Rates count activations whose `at`
 * lies in [from, to); stale alarms are any whose active time overlaps the period, each counted on
 * every 24-hour slice (from the period's start) in which it was past 24 h active.
 */
export function computeAlarmHealth(activations: readonly AlarmActivation[], period: HealthPeriod): AlarmHealthReport {
  const fromMs = instantToMs(period.from);
  const toMs = instantToMs(period.to);
  if (!(toMs > fromMs)) throw new RangeError("the period must end after it starts");
  const durationMs = toMs - fromMs;

  const parsed = activations.map((a) => ({
    alarmKey: a.alarmKey,
    priority: a.priority,
    atMs: instantToMs(a.at),
    untilMs: a.activeUntil === undefined || a.activeUntil === null ? null : instantToMs(a.activeUntil),
  }));
  const inPeriod = parsed.filter((a) => a.atMs >= fromMs && a.atMs < toMs);
  const times = inPeriod.map((a) => a.atMs).sort((a, b) => a - b);
  const total = times.length;

  const { peak, floods } = sweepTenMinuteWindows(times, toMs);
  const floodMs = floods.reduce((sum, f) => sum + (Date.parse(f.end) - Date.parse(f.start)), 0);

  const byKey = new Map<string, number[]>();
  for (const a of inPeriod) {
    const keyTimes = byKey.get(a.alarmKey);
    if (keyTimes) keyTimes.push(a.atMs);
    else byKey.set(a.alarmKey, [a.atMs]);
  }
  const chattering: ChatteringAlarm[] = [];
  for (const [alarmKey, keyTimes] of byKey) {
    const maxPerMinute = maxInOneMinute(keyTimes.sort((a, b) => a - b));
    if (maxPerMinute >= CHATTER_ACTIVATIONS_PER_MINUTE) chattering.push({ alarmKey, maxPerMinute, activations: keyTimes.length });
  }
  chattering.sort((a, b) => b.maxPerMinute - a.maxPerMinute || a.alarmKey.localeCompare(b.alarmKey));

  const ranked = [...byKey.entries()]
    .map(([alarmKey, keyTimes]) => ({ alarmKey, count: keyTimes.length }))
    .sort((a, b) => b.count - a.count || a.alarmKey.localeCompare(b.alarmKey));
  const top10: TopAlarm[] = ranked.slice(0, 10).map((r) => ({ ...r, sharePct: (100 * r.count) / total }));
  const top10Count = top10.reduce((sum, r) => sum + r.count, 0);

  const dayCount = Math.ceil(durationMs / DAY_MS);
  const daily = Array.from({ length: dayCount }, (_, i) => ({ dayStart: new Date(fromMs + i * DAY_MS).toISOString(), count: 0 }));
  for (const t of times) daily[Math.floor((t - fromMs) / DAY_MS)].count++;

  const stale: StaleAlarm[] = [];
  const stalePerDay = new Array<number>(dayCount).fill(0);
  for (const a of parsed) {
    const staleFrom = a.atMs + STALE_AFTER_HOURS * HOUR_MS;
    const endMs = Math.min(a.untilMs ?? toMs, toMs);
    if (endMs <= staleFrom || endMs <= fromMs || a.atMs >= toMs) continue;
    stale.push({
      alarmKey: a.alarmKey,
      activeSince: new Date(a.atMs).toISOString(),
      activeHours: (endMs - a.atMs) / HOUR_MS,
      stillActive: a.untilMs === null || a.untilMs > toMs,
    });
    const firstDay = Math.max(0, Math.floor((staleFrom - fromMs) / DAY_MS));
    const lastDay = Math.floor((endMs - 1 - fromMs) / DAY_MS);
    for (let d = firstDay; d <= lastDay; d++) stalePerDay[d]++;
  }
  stale.sort((a, b) => b.activeHours - a.activeHours || a.alarmKey.localeCompare(b.alarmKey));

  const priorityCounts: Record<AlarmPriority, number> = { critical: 0, high: 0, medium: 0, low: 0 };
  for (const a of inPeriod) priorityCounts[a.priority]++;

  const tenMinutePeriods = durationMs / TEN_MIN_MS;
  const periodDays = durationMs / DAY_MS;
  return {
    from: new Date(fromMs).toISOString(),
    to: new Date(toMs).toISOString(),
    periodDays,
    periodLongEnough: periodDays >= 30,
    totalActivations: total,
    metrics: {
      averagePer10Min: metric(total / tenMinutePeriods, BENCHMARKS.per10Min),
      averagePerHour: metric(total / (durationMs / HOUR_MS), BENCHMARKS.perHour),
      peakPer10Min: metric(peak, BENCHMARKS.peakPer10Min),
      averagePerDay: metric(total / periodDays, BENCHMARKS.perDay),
      averagePerDayIec: metric(total / periodDays, BENCHMARKS.perDayIec, BENCHMARK_SOURCES.iec),
      timeInFloodPct: metric((100 * floodMs) / durationMs, BENCHMARKS.timeInFlood),
      chatteringAlarms: metric(chattering.length, BENCHMARKS.chattering),
      staleMaxPerDay: metric(Math.max(0, ...stalePerDay), BENCHMARKS.stale),
      top10SharePct: metric(percentage(top10Count, total), BENCHMARKS.top10),
      priorityLowPct: metric(percentage(priorityCounts.low, total), BENCHMARKS.priorityLow),
      priorityMediumPct: metric(percentage(priorityCounts.medium, total), BENCHMARKS.priorityMedium),
      priorityHighPct: metric(percentage(priorityCounts.high + priorityCounts.critical, total), BENCHMARKS.priorityHigh),
    },
    floods,
    chattering,
    stale,
    top10,
    daily,
    priorityCounts,
  };
}
