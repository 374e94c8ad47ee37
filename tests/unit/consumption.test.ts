import { describe, it, expect } from "vitest";
import * as ss from "simple-statistics";
import { forecastConsumption, detectRefills, type VolumeSample } from "@/lib/forecast/consumption";
import { theilSenSlope } from "@/lib/signal/robust-stats";
import { seededNormal } from "./seeded-normal";

const DAY = 86_400_000;
const HOUR = 3_600_000;
const T0 = Date.UTC(2026, 2, 1);

// Synthetic tank [demo-style data]: 40 L a day drawn, readings every 6 h, a delivery of
// 3000 L on day 10 between two readings.
function tank(): VolumeSample[] {
  const out: VolumeSample[] = [];
  for (let h = 0; h <= 20 * 24; h += 6) {
    const day = h / 24;
    const volumeL = 2000 - 40 * day + (day > 10 ? 3000 : 0);
    out.push({ at: new Date(T0 + h * HOUR), volumeL });
  }
  return out;
}

describe("detectRefills", () => {
  it("finds a rise between consecutive readings and dates it by the first high reading", () => {
    const refills = detectRefills(tank(), { refillThresholdL: 200 });
    expect(refills).toHaveLength(1);
    expect(refills[0].at.getTime()).toBe(T0 + 10 * DAY + 6 * HOUR);
    expect(refills[0].fromL).toBeCloseTo(1600, 9);
    expect(refills[0].toL).toBeCloseTo(2000 - 40 * 10.25 + 3000, 9);
  });

  it("finds a fill spread over several readings, each step below the threshold", () => {
    // A pumped fill of 4 × 150 L within an hour, readings every 15 min, threshold 500 L [synthetic].
    const at = (min: number) => new Date(T0 + min * 60_000);
    const series = [
      { at: at(0), volumeL: 1000 },
      { at: at(15), volumeL: 999 },
      { at: at(30), volumeL: 1149 },
      { at: at(45), volumeL: 1299 },
      { at: at(60), volumeL: 1449 },
      { at: at(75), volumeL: 1599 },
      { at: at(90), volumeL: 1598 },
    ];
    const refills = detectRefills(series, { refillThresholdL: 500 });
    expect(refills).toHaveLength(1);
    expect(refills[0]).toMatchObject({ lowIndex: 1, peakIndex: 5, fromL: 999, toL: 1599 });
    expect(refills[0].at.getTime()).toBe(at(30).getTime());
    // With only consecutive readings considered, the same fill goes unnoticed.
    expect(detectRefills(series, { refillThresholdL: 500, refillSpanS: 0 })).toHaveLength(0);
  });

  it("ignores noise below the threshold and accepts readings in any order", () => {
    const draw = seededNormal(3);
    const noisy = tank().map((s) => ({ ...s, volumeL: s.volumeL + 15 * draw() }));
    expect(detectRefills([...noisy].reverse(), { refillThresholdL: 200 })).toHaveLength(1);
  });
});

describe("forecastConsumption", () => {
  it("excludes the refill and projects the draw-down since it", () => {
    // Noise-free, so least squares by simple-statistics on the same segment is the yardstick
    // [general-purpose library]; days = (current − reorder) / rate [computed].
    const series = tank();
    const f = forecastConsumption(series, { refillThresholdL: 200, reorderVolumeL: 1000 });
    const since = series.filter((s) => s.at.getTime() > T0 + 10 * DAY);
    const ols = ss.linearRegression(since.map((s) => [(s.at.getTime() - T0) / DAY, s.volumeL]));
    expect(f.slopeLPerDay).toBeCloseTo(ols.m, 9);
    expect(f.slopeLPerDay).toBeCloseTo(-40, 9);
    const current = series[series.length - 1].volumeL; // 4200 L on day 20
    expect(current).toBeCloseTo(4200, 9);
    expect(f.daysToReorder).toBeCloseTo((4200 - 1000) / 40, 9);
    expect(f.daysToEmpty).toBeCloseTo(4200 / 40, 9);
    expect(f.reorderAt?.getTime()).toBeCloseTo(T0 + 20 * DAY + 80 * DAY, -1);
    expect(f.emptyAt?.getTime()).toBeCloseTo(T0 + 20 * DAY + 105 * DAY, -1);
    expect(f.refills.map((d) => d.getTime())).toEqual([T0 + 10 * DAY + 6 * HOUR]);
    // Fitted through the refill, the same data would show a rising tank.
    const naive = theilSenSlope(series.map((s) => ({ x: (s.at.getTime() - T0) / DAY, y: s.volumeL })));
    expect(naive?.slope).toBeGreaterThan(0);
  });

  it("pools all draw-down segments when asked", () => {
    // Two segments at −30 and −50 L/day, 41 readings each: half the pooled slopes are each, so
    // the pooled median falls between them [computed].
    const series: VolumeSample[] = [];
    for (let h = 0; h <= 240; h += 6) series.push({ at: new Date(T0 + h * HOUR), volumeL: 2000 - (30 * h) / 24 });
    for (let h = 0; h <= 240; h += 6) series.push({ at: new Date(T0 + 11 * DAY + h * HOUR), volumeL: 5000 - (50 * h) / 24 });
    const latest = forecastConsumption(series, { refillThresholdL: 200, reorderVolumeL: 0 });
    const all = forecastConsumption(series, { refillThresholdL: 200, reorderVolumeL: 0, segments: "all" });
    expect(latest.slopeLPerDay).toBeCloseTo(-50, 9);
    expect(all.slopeLPerDay).toBeLessThanOrEqual(-30);
    expect(all.slopeLPerDay).toBeGreaterThanOrEqual(-50);
  });

  it("stays robust to noise and a few wild readings", () => {
    // Seeded 10 L noise and three 800 L dropouts (a lost echo read as a low level), whose recovery
    // stays under the 1000 L refill threshold [synthetic].
    const draw = seededNormal(11);
    const series = tank().map((s) => ({ ...s, volumeL: s.volumeL + 10 * draw() }));
    for (const i of [50, 60, 70]) series[i] = { ...series[i], volumeL: series[i].volumeL - 800 };
    const f = forecastConsumption(series, { refillThresholdL: 1000, reorderVolumeL: 1000 });
    expect(f.refills).toHaveLength(1);
    expect(Math.abs((f.slopeLPerDay ?? 0) / -40 - 1)).toBeLessThan(0.05);
  });

  it("uses the given current volume and time, and returns zero days once at or below reorder", () => {
    const now = new Date(T0 + 21 * DAY);
    const f = forecastConsumption(tank(), { refillThresholdL: 200, reorderVolumeL: 1000, currentVolumeL: 800, now });
    expect(f.daysToReorder).toBe(0);
    expect(f.reorderAt?.getTime()).toBe(now.getTime());
    expect(f.daysToEmpty).toBeCloseTo(20, 9);
  });

  it("gives no days when the trend is not falling or cannot be estimated", () => {
    const flat = Array.from({ length: 10 }, (_, i) => ({ at: new Date(T0 + i * DAY), volumeL: 1500 }));
    const f = forecastConsumption(flat, { refillThresholdL: 200, reorderVolumeL: 1000 });
    expect(f).toMatchObject({ slopeLPerDay: 0, daysToReorder: null, daysToEmpty: null, reorderAt: null, emptyAt: null });
    const single = forecastConsumption([flat[0]], { refillThresholdL: 200, reorderVolumeL: 1000 });
    expect(single.slopeLPerDay).toBeNull();
    expect(forecastConsumption([], { refillThresholdL: 200, reorderVolumeL: 1000 }).refills).toEqual([]);
    // Just after a refill only the peak reading remains in the latest segment.
    const justFilled = [...flat, { at: new Date(T0 + 10 * DAY), volumeL: 4000 }];
    expect(forecastConsumption(justFilled, { refillThresholdL: 200, reorderVolumeL: 1000 }).slopeLPerDay).toBeNull();
  });
});
