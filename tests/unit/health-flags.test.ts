import { describe, it, expect } from "vitest";
import {
  detectStuck,
  detectNoisy,
  detectOffline,
  detectCrosstalk,
  apparentSpeedOfSound,
} from "@/lib/health/flags";
import { seededNormal } from "./seeded-normal";

describe("detectStuck", () => {
  const moving = [1.2, 1.19, 1.18, 1.17, 1.16];

  it("flags a trailing run of unchanging values of at least minSamples", () => {
    const stuck = [...moving, 1.155, 1.155, 1.1552, 1.155, 1.155, 1.1551];
    expect(detectStuck(stuck, { minSamples: 6, tolerance: 0.0005 })).toBe(true);
    expect(detectStuck(stuck, { minSamples: 7, tolerance: 0.0005 })).toBe(false);
    // The band is max − min: 0.2 mm spread is stuck at 0.2 mm tolerance, not at 0.1 mm.
    expect(detectStuck(stuck.slice(-6), { minSamples: 6, tolerance: 0.0002 + 1e-12 })).toBe(true);
    expect(detectStuck(stuck.slice(-6), { minSamples: 6, tolerance: 0.0001 })).toBe(false);
  });

  it("does not flag a varying channel, too few values, or an old run followed by change", () => {
    expect(detectStuck(moving, { minSamples: 3, tolerance: 0.001 })).toBe(false);
    expect(detectStuck([1, 1], { minSamples: 3, tolerance: 0 })).toBe(false);
    expect(detectStuck([1, 1, 1, 1, 1.1], { minSamples: 3, tolerance: 0.01 })).toBe(false);
    expect(() => detectStuck(moving, { minSamples: 1, tolerance: 0 })).toThrow(RangeError);
  });
});

describe("detectNoisy", () => {
  it("judges burst spreads by their median, so one bad burst does not flag", () => {
    expect(detectNoisy({ spreads: [0.002, 0.003, 0.25, 0.002, 0.004] }, 0.01)).toBe(false);
    expect(detectNoisy({ spreads: [0.02, 0.03, 0.002, 0.025, 0.04] }, 0.01)).toBe(true);
    expect(detectNoisy({ spreads: [] }, 0.01)).toBe(false);
  });

  it("judges values by the robust σ of their differences, which a draw-down does not inflate", () => {
    // Seeded noise of σ = 5 mm and 1 mm on a 2 mm-a-reading draw-down, threshold 3 mm [synthetic].
    const draw = seededNormal(8);
    const series = (sigma: number) => Array.from({ length: 300 }, (_, i) => 2 - 0.002 * i + sigma * draw());
    expect(detectNoisy({ values: series(0.005) }, 0.003)).toBe(true);
    expect(detectNoisy({ values: series(0.001) }, 0.003)).toBe(false);
    expect(detectNoisy({ values: [1, 5] }, 0.003)).toBe(false);
  });
});

describe("detectOffline", () => {
  // PRODUCT.md: offline after no reading for 3 expected intervals.
  const last = new Date("2026-03-14T06:00:00Z");
  const after = (s: number) => new Date(last.getTime() + s * 1000);

  it("flags more than 3 expected intervals of silence", () => {
    expect(detectOffline(last, 300, after(899))).toBe(false);
    expect(detectOffline(last, 300, after(900))).toBe(false);
    expect(detectOffline(last, 300, after(901))).toBe(true);
    expect(detectOffline(last.getTime(), 60, after(181).getTime())).toBe(true);
  });

  it("treats a channel never heard from as offline and rejects a bad interval", () => {
    expect(detectOffline(null, 300, after(0))).toBe(true);
    expect(() => detectOffline(last, 0, after(1))).toThrow(RangeError);
  });
});

describe("detectCrosstalk", () => {
  const t = Date.UTC(2026, 2, 14, 6, 30);

  it("flags two channels pinged 59 ms apart but not 61 ms (60 ms gap: common practice)", () => {
    // REFERENCES.md §2 [common practice]: at least 60 ms between pings of multiplexed sensors.
    expect(detectCrosstalk({ 0: [t], 1: [t + 59] })).toEqual([{ channelA: 0, channelB: 1, minGapMs: 59 }]);
    expect(detectCrosstalk({ 0: [t], 1: [t + 61] })).toEqual([]);
    expect(detectCrosstalk({ 0: [t], 1: [t + 60] })).toEqual([]);
  });

  it("finds every close pair, keeps the smallest gap, and ignores a channel's own pings", () => {
    const pings = {
      0: [new Date(t), new Date(t + 1000)],
      1: [new Date(t + 20), new Date(t + 1045)],
      2: [new Date(t + 50), new Date(t + 5000)],
      3: [new Date(t + 5010), new Date(t + 5030)],
    };
    expect(detectCrosstalk(pings)).toEqual([
      { channelA: 0, channelB: 1, minGapMs: 20 },
      { channelA: 0, channelB: 2, minGapMs: 50 },
      { channelA: 1, channelB: 2, minGapMs: 30 },
      { channelA: 2, channelB: 3, minGapMs: 10 },
    ]);
    expect(detectCrosstalk({ 4: [t, t + 10, t + 20] })).toEqual([]);
    expect(detectCrosstalk({ 0: [t], 1: [t + 80] }, 100)).toHaveLength(1);
  });
});

describe("apparentSpeedOfSound", () => {
  it("inverts REFERENCES.md §2: 5 831 µs over 1.00064 m and 11 662 µs over 2.00128 m give 343.215 m/s", () => {
    // REFERENCES.md §2 rows [computed] at 20 °C with 331.3·√(1 + T/273.15) = 343.215 m/s (§1).
    expect(apparentSpeedOfSound(1.00064, 5831)).toBeCloseTo(343.215, 2);
    expect(apparentSpeedOfSound(2.00128, 11662)).toBeCloseTo(343.215, 2);
    // §2 at 0 °C: 2 915.5 µs ↔ 0.48295 m, c = 331.300 m/s.
    expect(apparentSpeedOfSound(0.48295, 2915.5)).toBeCloseTo(331.3, 2);
  });

  it("rejects non-positive inputs", () => {
    expect(() => apparentSpeedOfSound(1, 0)).toThrow(RangeError);
    expect(() => apparentSpeedOfSound(-1, 5000)).toThrow(RangeError);
  });
});
