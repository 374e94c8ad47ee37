import { describe, it, expect } from "vitest";
import * as ss from "simple-statistics";
import type { VolumeSample } from "@/lib/forecast/consumption";
import { coefficientOfDetermination, FORECAST_READINESS, forecastReadiness } from "@/lib/forecast/readiness";
import { planRow, planTank, projectTank, STALE_AFTER_INTERVALS, tankPurposeOf, type TankPlanInput } from "@/lib/forecast/purpose";
import { seededNormal } from "./seeded-normal";

const HOUR = 3_600_000;
const T0 = Date.UTC(2026, 10, 1);

// Synthetic hourly series [demo-style data]: volume(h) = start + rate·h/24, with optional noise.
function hourly(hours: number, startL: number, litresPerDay: number, noiseL = 0, seed = 1): VolumeSample[] {
  const normal = seededNormal(seed);
  return Array.from({ length: hours + 1 }, (_, h) => ({ at: new Date(T0 + h * HOUR), volumeL: startL + (litresPerDay * h) / 24 + noiseL * normal() }));
}

describe("forecast readiness (the criterion in DEVELOPERS.md)", () => {
  it("computes R² as simple-statistics does for a least-squares line", () => {
    const normal = seededNormal(3);
    const pts = Array.from({ length: 50 }, (_, i) => ({ x: i, y: 3 - 0.2 * i + normal() }));
    const pairs = pts.map((p) => [p.x, p.y]);
    const expected = ss.rSquared(pairs, ss.linearRegressionLine(ss.linearRegression(pairs)));
    expect(coefficientOfDetermination(pts)).toBeCloseTo(expected, 10);
    expect(coefficientOfDetermination(pts.slice(0, 2))).toBeNull();
  });

  it("is not ready a minute or a day after start, whatever the trend says", () => {
    const short = hourly(1, 5000, -100);
    expect(forecastReadiness(short, { refillThresholdL: 250 })).toMatchObject({ ready: false, points: 2 });
    const day = forecastReadiness(hourly(24, 5000, -100), { refillThresholdL: 250 });
    expect(day.ready).toBe(false);
    expect(day.reason).toMatch(/48 h/);
  });

  it("is ready after two steady days, and not when the level only wanders", () => {
    const steady = forecastReadiness(hourly(FORECAST_READINESS.minSpanHours, 5000, -100, 5), { refillThresholdL: 250 });
    expect(steady).toMatchObject({ ready: true, reason: null, points: 49 });
    expect(steady.rSquared!).toBeGreaterThan(FORECAST_READINESS.minRSquared);
    // 3 days of noise of 20 L around a flat level: no trend to project.
    const wandering = forecastReadiness(hourly(72, 5000, 0, 20), { refillThresholdL: 250 });
    expect(wandering.ready).toBe(false);
    expect(wandering.reason).toMatch(/steadily/);
  });

  it("counts only the draw-down since the last refill", () => {
    const before = hourly(72, 3000, -100);
    const after = hourly(10, 9000, -100).map((s) => ({ at: new Date(s.at.getTime() + 73 * HOUR), volumeL: s.volumeL }));
    const r = forecastReadiness([...before, ...after], { refillThresholdL: 250 });
    expect(r.ready).toBe(false);
    expect(r.points).toBe(11);
  });
});

const base = (over: Partial<TankPlanInput> = {}): TankPlanInput => {
  const series = over.series ?? hourly(72, 6000, -120);
  const last = series[series.length - 1];
  return {
    purpose: "supply",
    capacityL: 10_000,
    reorderPct: 30,
    safeFillPct: 90,
    series,
    current: last,
    openFlags: [],
    expectedIntervalS: 300,
    refillShare: 0.05,
    now: new Date(last.at.getTime() + 60_000),
    ...over,
  };
};

describe("plan by tank purpose", () => {
  it("supply: days to the reorder level and to empty from a steady draw-down (computed: (V − reorder)/rate)", () => {
    // 6000 − 3·120 = 5640 L now, 120 L a day: reorder at 3000 L in 22 d, empty in 47 d.
    const row = planTank(base());
    expect(row).toMatchObject({ purpose: "supply", status: "due", action: "deliver" });
    expect(row.rateLPerDay).toBeCloseTo(120, 6);
    expect(row.daysToDue!).toBeCloseTo(22 - 1 / 1440, 4);
    expect(row.daysToLimit!).toBeCloseTo(47 - 1 / 1440, 4);
    expect(row.volumeL).toBeCloseTo(9000 - 5640, 6);
    expect(row.dueAt!.getTime()).toBeGreaterThan(base().now.getTime());
  });

  it("supply: no days while the history is short, but a tank below its reorder level is due now", () => {
    const young = planTank(base({ series: hourly(2, 6000, -120) }));
    expect(young).toMatchObject({ status: "not_ready", dueAt: null, daysToDue: null, daysToLimit: null });
    expect(young.reason).toMatch(/48 h/);
    const low = planTank(base({ series: hourly(2, 2000, -120) }));
    expect(low).toMatchObject({ status: "due_now", action: "deliver", dueAt: null });
    expect(low.volumeL).toBeCloseTo(9000 - (2000 - 10), 6);
  });

  it("never presents a past date as the future: a mark the projection passed before now is due now", () => {
    // Last measured 2.5 h ago at 3010 L, falling 120 L a day: 10 L above the reorder level, which the
    // projection passed 2 h after that value (computed). With a 1 h reporting interval it is not stale.
    const series = hourly(72, 3010 + 3 * 120, -120);
    const last = series[series.length - 1];
    const row = planTank(base({ series, expectedIntervalS: 3600, now: new Date(last.at.getTime() + 2.5 * HOUR) }));
    expect(row.status).toBe("due_now");
    expect(row.dueAt).toBeNull();
    expect(row.daysToDue).toBe(0);
  });

  it("a stored projection read later counts days from the reading, and turns into due now once its date has passed", () => {
    const input = base();
    const stored = projectTank(input);
    expect(stored.dueAt!.getTime()).toBeCloseTo(input.current!.at.getTime() + 22 * 24 * HOUR, -3);
    // Ten days on, with a fresh value that stays the same: 12 days left (computed).
    const later = new Date(input.current!.at.getTime() + 10 * 24 * HOUR);
    const fresh = { ...input.current!, at: later };
    expect(planRow(stored, { current: fresh, openFlags: [], expectedIntervalS: 300, now: later }).daysToDue!).toBeCloseTo(12, 6);
    const past = new Date(input.current!.at.getTime() + 23 * 24 * HOUR);
    const row = planRow(stored, { current: { ...fresh, at: past }, openFlags: [], expectedIntervalS: 300, now: past });
    expect(row).toMatchObject({ status: "due_now", dueAt: null, daysToDue: 0 });
  });

  it("lists a tank with an open fault flag or a stale value as needing a check, with the reason", () => {
    const since = new Date(T0);
    const stuck = planTank(base({ openFlags: [{ kind: "stuck", since }] }));
    expect(stuck).toMatchObject({ status: "needs_check", action: null, dueAt: null, checks: [{ code: "flag", flag: "stuck", since }] });
    // Crosstalk is a risk, not a fault.
    expect(planTank(base({ openFlags: [{ kind: "crosstalk_risk", since }] })).status).toBe("due");
    const old = base();
    const stale = planTank({ ...old, now: new Date(old.current!.at.getTime() + (STALE_AFTER_INTERVALS * 300 + 1) * 1000) });
    expect(stale).toMatchObject({ status: "needs_check", checks: [{ code: "stale" }] });
    expect(planTank(base({ current: null })).checks).toEqual([{ code: "no_value" }]);
  });

  it("process: alarms only, no reorder", () => {
    expect(planTank(base({ purpose: "process" }))).toMatchObject({ status: "alarms_only", action: null, daysToDue: null });
  });

  it("sump: fills up, and gives days to its pump-out level and to overflow (computed: (mark − V)/inflow)", () => {
    // 2000 L + 3·150 L = 2450 L now, filling 150 L a day; pump-out at 80 % = 8000 L → 37 d; overflow at 10 000 L → 50.33 d.
    const series = hourly(72, 2000, 150);
    const row = planTank(base({ purpose: "sump", series, safeFillPct: 80, reorderPct: 10 }));
    expect(row).toMatchObject({ purpose: "sump", status: "due", action: "pump_out" });
    expect(row.rateLPerDay).toBeCloseTo(150, 6);
    expect(row.daysToDue!).toBeCloseTo(37 - 1 / 1440, 4);
    expect(row.daysToLimit!).toBeCloseTo(7550 / 150 - 1 / 1440, 4);
    expect(row.volumeL).toBeCloseTo(2450 - 1000, 6);
    // A pump-out (a fall) is the sump's "refill": only the filling since it counts.
    const pumped = [...hourly(72, 6000, 150), ...hourly(60, 500, 150).map((s) => ({ at: new Date(s.at.getTime() + 73 * HOUR), volumeL: s.volumeL }))];
    expect(planTank(base({ purpose: "sump", series: pumped, safeFillPct: 80 })).status).toBe("due");
    // A draining sump is not filling.
    expect(planTank(base({ purpose: "sump", series: hourly(72, 5000, -150), safeFillPct: 80 })).status).toBe("not_due");
  });

  it("reserve: kept full; below its minimum it needs topping up, otherwise nothing is due", () => {
    expect(planTank(base({ purpose: "reserve", reorderPct: 50 }))).toMatchObject({ status: "not_due", action: null });
    const low = planTank(base({ purpose: "reserve", reorderPct: 60, safeFillPct: null }));
    expect(low).toMatchObject({ status: "due_now", action: "top_up" });
    expect(low.volumeL).toBeCloseTo(10_000 - 5640, 6);
    expect(planTank(base({ purpose: "reserve", reorderPct: null })).status).toBe("no_level_set");
  });

  it("reads a tank stored without a purpose as supply; bays and points have none", () => {
    expect(tankPurposeOf("tank", null)).toBe("supply");
    expect(tankPurposeOf("tank", "sump")).toBe("sump");
    expect(tankPurposeOf("bay", null)).toBeNull();
  });
});
