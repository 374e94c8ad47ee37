import { describe, it, expect } from "vitest";
import { linearRegression } from "simple-statistics";
import { forecastTank } from "@/lib/worker/compute/forecast";

const HOUR = 3_600_000;
const DAY = 24 * HOUR;
const start = Date.parse("2026-03-01T00:00:00Z");

// Invented test input: hourly means of a 10 000 L tank drawn 120 L a day, refilled after `refillAtH` hours.
function hourly(hours: number, refillAtH: number): { at: Date; volumeL: number }[] {
  return Array.from({ length: hours }, (_, h) => ({ at: new Date(start + h * HOUR), volumeL: h < refillAtH ? 5000 - (120 * h) / 24 : 9000 - (120 * (h - refillAtH)) / 24 }));
}

const last = <T>(xs: T[]) => xs[xs.length - 1];

describe("forecastTank (the worker's forecast stage)", () => {
  it("projects a supply tank from the draw-down since the refill once it spans 48 h", () => {
    const series = hourly(120, 48);
    const current = last(series);
    const f = forecastTank({ purpose: "supply", series, capacityL: 10_000, reorderPct: 20, safeFillPct: 90, current });
    expect(f).toMatchObject({ status: "due", action: "deliver", samples: 120, refills: [new Date(start + 48 * HOUR)] });
    // The slope of the latest draw-down, as an ordinary least-squares line through it gives (simple-statistics).
    const latest = series.slice(48).map((s) => [(s.at.getTime() - start) / DAY, s.volumeL]);
    expect(-f.rateLPerDay!).toBeCloseTo(linearRegression(latest).m, 6);
    // Computed: (current − 2 000 L reorder level) / 120 L a day; empty at current / 120; 9 000 − current to deliver.
    expect(f.dueAt!.getTime()).toBeCloseTo(current.at.getTime() + ((current.volumeL - 2000) / 120) * DAY, -1);
    expect(f.limitAt!.getTime()).toBeCloseTo(current.at.getTime() + (current.volumeL / 120) * DAY, -1);
    expect(f.volumeL).toBeCloseTo(9000 - current.volumeL, 6);
    expect(f.readiness).toMatchObject({ ready: true, points: 72, spanHours: 71 });
  });

  it("gives no dates from 47 h since the refill: not ready, and says why", () => {
    const series = hourly(96, 49);
    const f = forecastTank({ purpose: "supply", series, capacityL: 10_000, reorderPct: 20, safeFillPct: 90, current: last(series) });
    expect(f).toMatchObject({ status: "not_ready", dueAt: null, limitAt: null, rateLPerDay: null });
    expect(f.reason).toMatch(/48 h/);
  });

  it("counts a sump's pump-outs as its refills and projects its filling to the pump-out level", () => {
    // Invented: a 10 000 L sump filling 150 L a day from 1 000 L, pumped out at hour 10 (from 4 000 L back to 1 000 L).
    const series = Array.from({ length: 90 }, (_, h) => ({ at: new Date(start + h * HOUR), volumeL: h < 10 ? 3940 + (150 * h) / 24 : 1000 + (150 * (h - 10)) / 24 }));
    const current = last(series);
    const f = forecastTank({ purpose: "sump", series, capacityL: 10_000, reorderPct: 10, safeFillPct: 80, current });
    expect(f.refills).toEqual([new Date(start + 10 * HOUR)]);
    expect(f).toMatchObject({ status: "due", action: "pump_out" });
    // Computed: (8 000 L pump-out level − current) / 150 L a day; overflow at (10 000 − current) / 150; current − 1 000 to pump out.
    expect(f.dueAt!.getTime()).toBeCloseTo(current.at.getTime() + ((8000 - current.volumeL) / 150) * DAY, -1);
    expect(f.limitAt!.getTime()).toBeCloseTo(current.at.getTime() + ((10_000 - current.volumeL) / 150) * DAY, -1);
    expect(f.volumeL).toBeCloseTo(current.volumeL - 1000, 6);
  });

  it("plans nothing for a process tank and nothing before the first value", () => {
    const series = hourly(120, 48);
    expect(forecastTank({ purpose: "process", series, capacityL: 10_000, reorderPct: 20, safeFillPct: 90, current: last(series) })).toMatchObject({ status: "alarms_only", dueAt: null });
    expect(forecastTank({ purpose: "supply", series: [], capacityL: 10_000, reorderPct: 20, safeFillPct: 90, current: null })).toMatchObject({ status: "not_ready", samples: 0, refills: [] });
  });
});
