import { describe, it, expect } from "vitest";
import { linearRegression } from "simple-statistics";
import { forecastTank } from "@/lib/worker/compute/forecast";
import { PIPELINE_SETTINGS } from "@/lib/worker/compute/settings";

const HOUR = 3_600_000;
const DAY = 24 * HOUR;
const start = Date.parse("2026-03-01T00:00:00Z");

// Invented test input: hourly means of a 10 000 L tank drawn 120 L a day, refilled on day 2.
function hourly(): { at: Date; volumeL: number }[] {
  const out = [];
  for (let h = 0; h < 96; h++) {
    const days = h / 24;
    out.push({ at: new Date(start + h * HOUR), volumeL: h < 48 ? 5000 - 120 * days : 9000 - 120 * (days - 2) });
  }
  return out;
}

describe("forecastTank", () => {
  it("fits the draw-down since the refill and projects the reorder level and empty", () => {
    const series = hourly();
    const f = forecastTank({ series, capacityL: 10_000, reorderPct: 20 });
    // The slope of the latest draw-down, as an ordinary least-squares line through it gives (simple-statistics).
    const latest = series.slice(48).map((s) => [(s.at.getTime() - start) / DAY, s.volumeL]);
    expect(f.slopeLPerDay).toBeCloseTo(linearRegression(latest).m, 6);
    expect(f.slopeLPerDay).toBeCloseTo(-120, 6);
    expect(f.refills).toEqual([new Date(start + 48 * HOUR)]);
    const current = series[series.length - 1].volumeL;
    expect(f.currentVolumeL).toBe(current);
    expect(f.reorderVolumeL).toBe(2000);
    expect(f.daysToReorder).toBeCloseTo((current - 2000) / 120, 6);
    expect(f.daysToEmpty).toBeCloseTo(current / 120, 6);
    expect(f.emptyAt?.getTime()).toBeCloseTo(series[series.length - 1].at.getTime() + (current / 120) * DAY, -1);
  });

  it("projects from the latest measurement when given one", () => {
    const series = hourly();
    const now = { at: new Date(series[series.length - 1].at.getTime() + HOUR), volumeL: 8000 };
    const f = forecastTank({ series, capacityL: 10_000, reorderPct: 20, current: now });
    expect(f.daysToReorder).toBeCloseTo(6000 / 120, 6);
    expect(f.reorderAt?.getTime()).toBeCloseTo(now.at.getTime() + 50 * DAY, -1);
  });

  it("gives no reorder date without a reorder level, and nothing from too few points", () => {
    const series = hourly();
    expect(forecastTank({ series, capacityL: 10_000, reorderPct: null })).toMatchObject({ daysToReorder: null, reorderAt: null, reorderVolumeL: null });
    const few = forecastTank({ series: series.slice(0, PIPELINE_SETTINGS.forecastMinSamples - 1), capacityL: 10_000, reorderPct: 20 });
    expect(few).toMatchObject({ slopeLPerDay: null, daysToEmpty: null });
  });

  it("does not project a tank that is filling", () => {
    const rising = Array.from({ length: 24 }, (_, h) => ({ at: new Date(start + h * HOUR), volumeL: 1000 + 10 * h }));
    const f = forecastTank({ series: rising, capacityL: 10_000, reorderPct: 20 });
    expect(f.slopeLPerDay as number).toBeGreaterThan(0);
    expect(f.daysToEmpty).toBeNull();
  });
});
