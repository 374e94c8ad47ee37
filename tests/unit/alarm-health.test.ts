import { describe, it, expect } from "vitest";
import { type AlarmActivation, BENCHMARK_SOURCES, computeAlarmHealth } from "@/lib/alarms/alarm-health";
import type { AlarmPriority } from "@/lib/alarms/state-machine";

// Thirty days, the shortest period the ISA-18.2 / EEMUA 191 benchmarks are stated over (REFERENCES.md §4).
const PERIOD = { from: "2026-03-01T00:00:00Z", to: "2026-03-31T00:00:00Z" };
const FROM_MS = Date.parse(PERIOD.from);
const MIN = 60_000;
const HOUR = 60 * MIN;
const DAY = 24 * HOUR;

function act(alarmKey: string, atMs: number, priority: AlarmPriority = "low", activeUntilMs?: number): AlarmActivation {
  return { alarmKey, at: new Date(atMs).toISOString(), priority, activeUntil: activeUntilMs === undefined ? undefined : new Date(activeUntilMs) };
}

/** n activations of distinct alarms, one every stepMs from startMs. */
function evenly(n: number, stepMs: number, startMs = FROM_MS, key = (i: number) => `a${i}`): AlarmActivation[] {
  return Array.from({ length: n }, (_, i) => act(key(i), startMs + i * stepMs));
}

const iso = (ms: number) => new Date(ms).toISOString();

describe("average and peak rates against ISA-18.2 / EEMUA 191 and IEC 62682 (REFERENCES.md §4)", () => {
  it("one alarm every 10 min: ~1 / 10 min, ~6 / h, 144 / day — the 'very likely acceptable' figures", () => {
    const r = computeAlarmHealth(evenly(4320, 10 * MIN), PERIOD);
    expect(r.totalActivations).toBe(4320);
    expect(r.metrics.averagePer10Min).toMatchObject({ value: 1, verdict: "within" });
    expect(r.metrics.averagePerHour).toMatchObject({ value: 6, verdict: "within" });
    expect(r.metrics.averagePerDay).toMatchObject({ value: 144, verdict: "within" });
    // IEC 62682 gives ~144 / day: exactly at the threshold is still within.
    expect(r.metrics.averagePerDayIec).toMatchObject({ value: 144, verdict: "within" });
    expect(r.metrics.peakPer10Min).toMatchObject({ value: 1, verdict: "within" });
    expect(r.floods).toEqual([]);
    expect(r.daily).toHaveLength(30);
    expect(r.daily.every((d) => d.count === 144)).toBe(true);
  });

  it("one every 5 min: ~2 / 10 min, ~12 / h, 288 / day — the 'maximum manageable' figures", () => {
    const r = computeAlarmHealth(evenly(8640, 5 * MIN), PERIOD);
    expect(r.metrics.averagePer10Min).toMatchObject({ value: 2, verdict: "manageable" });
    expect(r.metrics.averagePerHour).toMatchObject({ value: 12, verdict: "manageable" });
    expect(r.metrics.averagePerDay).toMatchObject({ value: 288, verdict: "manageable" });
    expect(r.metrics.averagePerDayIec).toMatchObject({ value: 288, verdict: "manageable" });
  });

  it("300 a day: ISA-18.2 / EEMUA 191's ~300 maximum manageable, over IEC 62682's ~288", () => {
    const r = computeAlarmHealth(evenly(9000, 4.8 * MIN), PERIOD);
    expect(r.metrics.averagePerDay.value).toBeCloseTo(300, 9);
    expect(r.metrics.averagePerDay.verdict).toBe("manageable");
    expect(r.metrics.averagePerDayIec.verdict).toBe("exceeds");
    expect(r.metrics.averagePer10Min.verdict).toBe("exceeds");
  });

  it("counts only activations inside [from, to)", () => {
    const r = computeAlarmHealth([act("x", FROM_MS - 1), act("x", FROM_MS), act("x", Date.parse(PERIOD.to))], PERIOD);
    expect(r.totalActivations).toBe(1);
  });

  it("says whether the period covers the 30 days the benchmarks assume", () => {
    expect(computeAlarmHealth([], PERIOD)).toMatchObject({ periodDays: 30, periodLongEnough: true });
    expect(computeAlarmHealth([], { from: PERIOD.from, to: iso(FROM_MS + 7 * DAY) }).periodLongEnough).toBe(false);
    expect(() => computeAlarmHealth([], { from: PERIOD.to, to: PERIOD.from })).toThrow(RangeError);
  });
});

describe("floods: more than 10 in 10 min, ending below 5 per 10 min (REFERENCES.md §4)", () => {
  const start = Date.parse("2026-03-10T10:00:00Z");

  it("12 alarms 30 s apart: starts with the 11th, ends when the trailing count drops to 4", () => {
    const r = computeAlarmHealth(evenly(12, 30_000, start), PERIOD);
    // Worked by hand: the 11th activation is at 10:05:00; the 8th one leaves the trailing 10 min at
    // 10:03:30 + 10 min = 10:13:30, leaving 4.
    expect(r.floods).toEqual([
      { start: "2026-03-10T10:05:00.000Z", end: "2026-03-10T10:13:30.000Z", ongoing: false, alarmCount: 12, peakPer10Min: 12 },
    ]);
    expect(r.metrics.peakPer10Min).toMatchObject({ value: 12, verdict: "exceeds" });
    // 510 s in flood out of 30 days.
    expect(r.metrics.timeInFloodPct.value).toBeCloseTo((100 * 510) / (30 * 86_400), 12);
    expect(r.metrics.timeInFloodPct.verdict).toBe("within");
  });

  it("exactly 10 in 10 min is not a flood", () => {
    const r = computeAlarmHealth(evenly(10, 30_000, start), PERIOD);
    expect(r.floods).toEqual([]);
    expect(r.metrics.peakPer10Min).toMatchObject({ value: 10, verdict: "within" });
  });

  it("keeps flooding while 5 or more remain per 10 min, not only while above 10", () => {
    const burst = evenly(11, 5_000, start, (i) => `burst${i}`);
    const steady = evenly(30, MIN, start + MIN, (i) => `steady${i}`);
    const r = computeAlarmHealth([...burst, ...steady], PERIOD);
    // Worked by hand: starts at the 11th of the burst (10:00:50); the steady one a minute keeps about 10
    // in every window; after the last (10:30) the count falls to 4 when 10:26 leaves, at 10:36.
    expect(r.floods).toEqual([
      { start: "2026-03-10T10:00:50.000Z", end: "2026-03-10T10:36:00.000Z", ongoing: false, alarmCount: 41, peakPer10Min: 20 },
    ]);
  });

  it("reports a flood still going at the period's end as ongoing, ending at the period's end", () => {
    const lastMinutes = Date.parse(PERIOD.to) - 2 * MIN;
    const r = computeAlarmHealth(evenly(11, 10_000, lastMinutes), PERIOD);
    expect(r.floods).toEqual([
      { start: "2026-03-30T23:59:40.000Z", end: "2026-03-31T00:00:00.000Z", ongoing: true, alarmCount: 11, peakPer10Min: 11 },
    ]);
  });

  it("judges time in flood against < ~1 %", () => {
    // Two 510-s floods every day (as above, at 10:00 and 16:00): 1 020 s a day, 1.18 % of the time.
    const daily = Array.from({ length: 30 }, (_, d) =>
      [10, 16].flatMap((h) => evenly(12, 30_000, FROM_MS + d * DAY + h * HOUR, (i) => `d${d}-${h}-${i}`)),
    ).flat();
    const r = computeAlarmHealth(daily, PERIOD);
    expect(r.floods).toHaveLength(60);
    expect(r.metrics.timeInFloodPct.value).toBeCloseTo((100 * 1020) / 86_400, 9);
    expect(r.metrics.timeInFloodPct.verdict).toBe("exceeds");
  });
});

describe("chattering: 3 or more activations in 1 min, target zero (REFERENCES.md §4)", () => {
  const noon = Date.parse("2026-03-12T12:00:00Z");

  it("flags an alarm with 3 activations inside one minute and not one whose third comes at exactly 60 s", () => {
    const r = computeAlarmHealth(
      [
        act("bay-3:occupied", noon),
        act("bay-3:occupied", noon + 20_000),
        act("bay-3:occupied", noon + 40_000),
        act("bay-3:occupied", noon + HOUR),
        act("tank-2:h", noon),
        act("tank-2:h", noon + 30_000),
        act("tank-2:h", noon + 60_000),
      ],
      PERIOD,
    );
    expect(r.chattering).toEqual([{ alarmKey: "bay-3:occupied", maxPerMinute: 3, activations: 4 }]);
    expect(r.metrics.chatteringAlarms).toMatchObject({ value: 1, verdict: "exceeds" });
  });

  it("zero chattering alarms meets the target", () => {
    const r = computeAlarmHealth([act("tank-2:h", noon), act("tank-2:h", noon + 61_000)], PERIOD);
    expect(r.metrics.chatteringAlarms).toMatchObject({ value: 0, verdict: "within" });
  });
});

describe("stale: active over 24 h, fewer than 5 on any day (REFERENCES.md §4)", () => {
  it("finds the alarms active over 24 h, cleared or still active, including one raised before the period", () => {
    const r = computeAlarmHealth(
      [
        act("tank-1:l", FROM_MS + DAY, "medium", FROM_MS + 2 * DAY + HOUR), // 25 h
        act("tank-1:ll", FROM_MS + DAY, "high", FROM_MS + 2 * DAY - HOUR), // 23 h: not stale
        act("tank-4:h", FROM_MS + 24 * DAY, "medium"), // never cleared: 6 days to the period's end
        act("tank-9:l", FROM_MS - 9 * DAY, "low", FROM_MS + 12 * HOUR), // raised before the period
      ],
      PERIOD,
    );
    expect(r.stale).toEqual([
      { alarmKey: "tank-9:l", activeSince: iso(FROM_MS - 9 * DAY), activeHours: 228, stillActive: false },
      { alarmKey: "tank-4:h", activeSince: iso(FROM_MS + 24 * DAY), activeHours: 144, stillActive: true },
      { alarmKey: "tank-1:l", activeSince: iso(FROM_MS + DAY), activeHours: 25, stillActive: false },
    ]);
    expect(r.metrics.staleMaxPerDay).toMatchObject({ value: 1, verdict: "within" });
    expect(r.totalActivations).toBe(3);
  });

  it("4 stale on one day is within, 5 is not", () => {
    const stale = (n: number) =>
      Array.from({ length: n }, (_, i) => act(`tank-${i}:l`, FROM_MS + 3 * DAY + i * HOUR, "low", FROM_MS + 5 * DAY));
    expect(computeAlarmHealth(stale(4), PERIOD).metrics.staleMaxPerDay).toMatchObject({ value: 4, verdict: "within" });
    expect(computeAlarmHealth(stale(5), PERIOD).metrics.staleMaxPerDay).toMatchObject({ value: 5, verdict: "exceeds" });
  });
});

describe("top 10 by count and their share of the load, < ~1–5 % (REFERENCES.md §4)", () => {
  it("ranks a small system's alarms and shows that its top 10 carry nearly all the load", () => {
    // k01 raised 12 times, k02 11 times … k12 once: 78 in all, the top 10 carry 75.
    const list = Array.from({ length: 12 }, (_, k) =>
      evenly(12 - k, 2 * HOUR, FROM_MS + k * 7 * MIN, () => `k${String(k + 1).padStart(2, "0")}`),
    ).flat();
    const r = computeAlarmHealth(list, PERIOD);
    expect(r.top10.map((t) => t.alarmKey)).toEqual(["k01", "k02", "k03", "k04", "k05", "k06", "k07", "k08", "k09", "k10"]);
    expect(r.top10[0]).toEqual({ alarmKey: "k01", count: 12, sharePct: (100 * 12) / 78 });
    expect(r.metrics.top10SharePct.value).toBeCloseTo((100 * 75) / 78, 12);
    expect(r.metrics.top10SharePct.verdict).toBe("exceeds");
  });

  it("is within below 1 % and manageable below 5 %", () => {
    const broad = computeAlarmHealth(evenly(1250, 30 * MIN), PERIOD);
    expect(broad.metrics.top10SharePct.value).toBeCloseTo(0.8, 12);
    expect(broad.metrics.top10SharePct.verdict).toBe("within");
    const middling = computeAlarmHealth(evenly(300, 2 * HOUR), PERIOD);
    expect(middling.metrics.top10SharePct.value).toBeCloseTo(100 / 30, 12);
    expect(middling.metrics.top10SharePct.verdict).toBe("manageable");
  });
});

describe("priority mix ~80 / 15 / 5 % low / medium / high (REFERENCES.md §4)", () => {
  const mix = (counts: Partial<Record<AlarmPriority, number>>) =>
    Object.entries(counts).flatMap(([priority, n], p) =>
      Array.from({ length: n }, (_, i) => act(`${priority}-${i}`, FROM_MS + (p * 200 + i) * HOUR, priority as AlarmPriority)),
    );

  it("80 / 15 / 5 meets the benchmark", () => {
    const r = computeAlarmHealth(mix({ low: 80, medium: 15, high: 5 }), PERIOD);
    expect(r.metrics.priorityLowPct).toMatchObject({ value: 80, verdict: "within" });
    expect(r.metrics.priorityMediumPct).toMatchObject({ value: 15, verdict: "within" });
    expect(r.metrics.priorityHighPct).toMatchObject({ value: 5, verdict: "within" });
    expect(r.priorityCounts).toEqual({ critical: 0, high: 5, medium: 15, low: 80 });
  });

  it("counts critical with high against the single high band", () => {
    const r = computeAlarmHealth(mix({ low: 78, medium: 16, high: 3, critical: 3 }), PERIOD);
    expect(r.metrics.priorityHighPct).toMatchObject({ value: 6, verdict: "exceeds" });
    expect(r.metrics.priorityLowPct.verdict).toBe("exceeds");
    expect(r.metrics.priorityMediumPct.verdict).toBe("exceeds");
  });

  it("has no verdict on shares without any activation", () => {
    const r = computeAlarmHealth([], PERIOD);
    expect(r.metrics.priorityLowPct).toMatchObject({ value: null, verdict: "no_data" });
    expect(r.metrics.top10SharePct).toMatchObject({ value: null, verdict: "no_data" });
    expect(r.metrics.averagePer10Min).toMatchObject({ value: 0, verdict: "within" });
  });
});

describe("every figure carries its benchmark and the source text of REFERENCES.md §4", () => {
  const r = computeAlarmHealth(evenly(10, HOUR), PERIOD);

  it("quotes the source tags verbatim", () => {
    expect(BENCHMARK_SOURCES.isaEemua).toBe("ISA-18.2 / EEMUA 191 [published, via secondary sources]");
    expect(BENCHMARK_SOURCES.iec).toBe("IEC 62682 [published, via secondary sources]");
    for (const [name, m] of Object.entries(r.metrics)) {
      expect(m.source, name).toBe(name === "averagePerDayIec" ? BENCHMARK_SOURCES.iec : BENCHMARK_SOURCES.isaEemua);
    }
  });

  it("states the thresholds of REFERENCES.md §4 as data", () => {
    const { metrics } = r;
    expect(metrics.averagePerHour.benchmark).toMatchObject({ acceptable: 6, manageable: 12, comparison: "at_most" });
    expect(metrics.averagePerHour.benchmark.text).toContain("~6 alarms an hour");
    expect(metrics.averagePer10Min.benchmark).toMatchObject({ acceptable: 1, manageable: 2 });
    expect(metrics.averagePerDay.benchmark).toMatchObject({ acceptable: 150, manageable: 300 });
    expect(metrics.averagePerDayIec.benchmark).toMatchObject({ acceptable: 144, manageable: 288 });
    expect(metrics.peakPer10Min.benchmark.text).toBe("more than 10 alarms in 10 min is a flood");
    expect(metrics.timeInFloodPct.benchmark).toMatchObject({ acceptable: 1, comparison: "below" });
    expect(metrics.chatteringAlarms.benchmark).toMatchObject({ acceptable: 0 });
    expect(metrics.staleMaxPerDay.benchmark).toMatchObject({ acceptable: 5, comparison: "below" });
    expect(metrics.top10SharePct.benchmark.text).toBe("top-10 alarms < ~1–5 % of the load");
    expect(metrics.priorityLowPct.benchmark).toMatchObject({ acceptable: 80, comparison: "at_least" });
    expect(metrics.priorityHighPct.benchmark.text).toBe("priority mix ~80 / 15 / 5 % low / medium / high");
  });
});
