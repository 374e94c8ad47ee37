import { describe, it, expect } from "vitest";
import * as ss from "simple-statistics";
import { isHampelOutlier, hampelFlags } from "@/lib/signal/hampel";
import { seededNormal } from "./seeded-normal";

describe("isHampelOutlier", () => {
  const window = [2.01, 1.98, 2.03, 2.0, 1.97, 2.02, 1.99, 2.04];

  it("puts the boundary at median ± n·1.4826·MAD computed by simple-statistics", () => {
    // Hampel identifier (Pearson et al. 2016) with median and MAD from simple-statistics [general-purpose library]
    const centre = ss.median(window);
    const scale = 1.4826 * ss.medianAbsoluteDeviation(window);
    for (const n of [2, 3]) {
      expect(isHampelOutlier(window, centre + n * scale * 1.001, { nSigmas: n })).toBe(true);
      expect(isHampelOutlier(window, centre + n * scale * 0.999, { nSigmas: n })).toBe(false);
      expect(isHampelOutlier(window, centre - n * scale * 1.001, { nSigmas: n })).toBe(true);
    }
    // nSigmas defaults to 3, the usual choice (common practice).
    expect(isHampelOutlier(window, centre + 2.5 * scale)).toBe(false);
    expect(isHampelOutlier(window, centre + 3.1 * scale)).toBe(true);
  });

  it("treats any change against a constant window as an outlier unless σ has a floor", () => {
    // MAD = 0 for a repeated value [computed]; a 1 mm floor keeps a 1 mm step from counting.
    const flat = [1.5, 1.5, 1.5, 1.5, 1.5];
    expect(isHampelOutlier(flat, 1.501)).toBe(true);
    expect(isHampelOutlier(flat, 1.501, { minSigma: 0.001 })).toBe(false);
    expect(isHampelOutlier(flat, 1.51, { minSigma: 0.001 })).toBe(true);
    expect(isHampelOutlier([], 99)).toBe(false);
  });
});

const indicesOf = (flags: boolean[]) => flags.flatMap((f, i) => (f ? [i] : []));

describe("hampelFlags (causal)", () => {
  it("flags a spike in an otherwise smooth series, and hardly anything else", () => {
    // A slow draw-down (0.02 mm a reading) with seeded 1 mm noise and one 0.3 m spike [synthetic data].
    // With σ floored at the noise level the identifier is a 3σ test on Gaussian noise, whose
    // two-sided tail beyond 3σ is 0.27 % (standard normal table); allow up to 1 %.
    // Without the floor, the MAD of 20 values is a rough σ and many more readings get marked.
    const draw = seededNormal(5);
    const xs = Array.from({ length: 2000 }, (_, i) => 2 - 0.00002 * i + 0.001 * draw());
    xs[1337] += 0.3;
    const flagged = indicesOf(hampelFlags(xs, { halfWindow: 10, minSigma: 0.001 }));
    expect(flagged).toContain(1337);
    expect(flagged.length / xs.length).toBeLessThan(0.01);
    const unfloored = indicesOf(hampelFlags(xs, { halfWindow: 10 }));
    expect(unfloored).toContain(1337);
    expect(unfloored.length).toBeGreaterThan(flagged.length);
  });

  it("with detrend, stops marking a steady draw-down that the lagging median trips over", () => {
    // Draw-down of 0.3σ a reading [synthetic data]: the causal median sits ≈ 5.5 readings behind,
    // 1.65σ off the value. Judging against the window's Theil–Sen line removes that lag.
    const draw = seededNormal(6);
    const xs = Array.from({ length: 2000 }, (_, i) => 2 - 0.0003 * i + 0.001 * draw());
    xs[1337] += 0.05;
    const plain = indicesOf(hampelFlags(xs, { halfWindow: 5, minSigma: 0.001 }));
    const detrended = indicesOf(hampelFlags(xs, { halfWindow: 5, minSigma: 0.001, detrend: true }));
    expect(detrended).toContain(1337);
    expect(plain.length).toBeGreaterThan(2 * detrended.length);
    expect(plain.length / xs.length).toBeGreaterThan(0.02);
  });

  it("judges each value only against the values before it", () => {
    const xs = [1, 1.01, 0.99, 1.0, 1.02, 0.98, 1.0, 5, 1.01, 1.0];
    const flags = hampelFlags(xs, { halfWindow: 3 });
    expect(flags[7]).toBe(true);
    // Changing later values cannot change an earlier verdict.
    const altered = hampelFlags([...xs.slice(0, 8), 5, 5], { halfWindow: 3 });
    expect(altered.slice(0, 8)).toEqual(flags.slice(0, 8));
    // Fewer than three predecessors: not judged.
    expect(hampelFlags([1, 1, 50], { halfWindow: 3 })[2]).toBe(false);
    expect(hampelFlags([1, 1, 1, 50], { halfWindow: 3 })[3]).toBe(true);
  });

  it("accepts a sustained step once it fills half the window", () => {
    // A real level change (refill) [computed]: with 2k = 6 preceding values, the new level is
    // the median once 3 of them carry it, so at most k readings are marked.
    const xs = [...Array.from({ length: 20 }, (_, i) => 1 + 0.001 * (i % 3)), ...Array.from({ length: 20 }, (_, i) => 2 + 0.001 * (i % 3))];
    const flags = hampelFlags(xs, { halfWindow: 3 });
    const marked = indicesOf(flags);
    expect(marked[0]).toBe(20);
    expect(marked.length).toBeLessThanOrEqual(3);
    expect(marked.every((i) => i >= 20 && i < 23)).toBe(true);
  });

  it("rejects a half-window that is not a positive integer", () => {
    expect(() => hampelFlags([1, 2, 3], { halfWindow: 0 })).toThrow(RangeError);
  });
});
