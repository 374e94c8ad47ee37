import { describe, it, expect } from "vitest";
import { hampelFlags } from "@/lib/signal/hampel";
import { isHampelSpike } from "@/lib/worker/compute/streaming-hampel";
import { mulberry32, seededNormal } from "./seeded-normal";

// The worker's streaming Hampel judge must flag exactly what lib/signal/hampel's hampelFlags flags,
// value for value, when fed the same series one value at a time with a sliding window.

const HALF_WINDOW = 5;
const OPTIONS = { nSigmas: 3, minSigma: 0.003, minWindow: 3 };

function streamed(xs: readonly number[], detrend: boolean): boolean[] {
  const window: number[] = [];
  return xs.map((x) => {
    const flag = isHampelSpike(window, x, detrend, OPTIONS);
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
    it(`agrees with hampelFlags value for value (detrend ${detrend}, 60 seeded series)`, () => {
      let flagged = 0;
      for (let seed = 1; seed <= 60; seed++) {
        const xs = series(seed, 200);
        const expected = hampelFlags(xs, { halfWindow: HALF_WINDOW, nSigmas: OPTIONS.nSigmas, minSigma: OPTIONS.minSigma, minWindow: OPTIONS.minWindow, detrend });
        expect(streamed(xs, detrend), `seed ${seed}`).toEqual(expected);
        flagged += expected.filter(Boolean).length;
      }
      // The comparison is only worth something if spikes were actually flagged.
      expect(flagged).toBeGreaterThan(100);
    });
  }

  it("judges nothing against fewer values than the minimum window", () => {
    expect(isHampelSpike([1, 1], 100, false, OPTIONS)).toBe(false);
    expect(isHampelSpike([1, 1, 1], 100, false, OPTIONS)).toBe(true);
  });
});
