import { describe, it, expect } from "vitest";
import * as ss from "simple-statistics";
import { hampelFlags, isHampelSpike } from "@/lib/signal/hampel";
import { mulberry32, seededNormal } from "./seeded-normal";

// The worker's streaming Hampel judge (lib/signal/hampel, on scratch buffers) must flag exactly what a
// plain reference flags, value for value: the Hampel identifier (Pearson et al. 2016) and, detrended,
// the Theil–Sen line (median of pairwise slopes, then median of yᵢ − slope·i), with every median and
// MAD taken by simple-statistics [general-purpose library].

const HALF_WINDOW = 5;
const OPTIONS = { nSigmas: 3, minSigma: 0.003, minWindow: 3 };

function referenceFlags(xs: readonly number[], detrend: boolean): boolean[] {
  const span = 2 * HALF_WINDOW;
  return xs.map((x, i) => {
    const window = xs.slice(Math.max(0, i - span), i);
    if (window.length < OPTIONS.minWindow) return false;
    let values = window;
    let deviation = x;
    if (detrend) {
      const slopes = window.flatMap((yi, a) => window.slice(a + 1).map((yj, b) => (yj - yi) / (b + 1)));
      const slope = ss.median(slopes);
      const intercept = ss.median(window.map((y, k) => y - slope * k));
      values = window.map((y, k) => y - (intercept + slope * k));
      deviation = x - (intercept + slope * window.length);
    }
    const scale = Math.max(1.4826 * ss.medianAbsoluteDeviation(values), OPTIONS.minSigma);
    return Math.abs(deviation - ss.median(values)) > OPTIONS.nSigmas * scale;
  });
}

function streamed(xs: readonly number[], detrend: boolean): boolean[] {
  const window: number[] = [];
  return xs.map((x) => {
    const flag = isHampelSpike(window, x, { ...OPTIONS, detrend });
    window.push(x);
    if (window.length > 2 * HALF_WINDOW) window.shift();
    return flag;
  });
}

function series(seed: number, n: number): number[] {
  const normal = seededNormal(seed);
  const uniform = mulberry32(seed + 1);
  let level = 1 + uniform();
  const slope = (uniform() - 0.5) * 0.02;
  return Array.from({ length: n }, () => {
    level += slope;
    if (uniform() < 0.02) level += (uniform() - 0.5) * 0.5; // a step (refill, car)
    const spike = uniform() < 0.05 ? (uniform() - 0.5) * 0.6 : 0;
    const value = level + 0.004 * normal() + spike;
    // Every third series is quantised to whole millimetres, so ties and zero MADs occur.
    return seed % 3 === 0 ? Math.round(value * 1000) / 1000 : value;
  });
}

describe("streaming Hampel judge", () => {
  for (const detrend of [false, true]) {
    it(`agrees with the simple-statistics reference value for value (detrend ${detrend}, 60 seeded series)`, () => {
      let flagged = 0;
      for (let seed = 1; seed <= 60; seed++) {
        const xs = series(seed, 200);
        const expected = referenceFlags(xs, detrend);
        expect(streamed(xs, detrend), `seed ${seed}`).toEqual(expected);
        expect(hampelFlags(xs, { halfWindow: HALF_WINDOW, ...OPTIONS, detrend }), `seed ${seed}`).toEqual(expected);
        flagged += expected.filter(Boolean).length;
      }
      // The comparison is only worth something if spikes were actually flagged.
      expect(flagged).toBeGreaterThan(100);
    });
  }

  it("judges nothing against fewer values than the minimum window", () => {
    expect(isHampelSpike([1, 1], 100, OPTIONS)).toBe(false);
    expect(isHampelSpike([1, 1, 1], 100, OPTIONS)).toBe(true);
  });
});
