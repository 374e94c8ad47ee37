import { describe, it, expect } from "vitest";
import * as ss from "simple-statistics";
import {
  median,
  medianAbsoluteDeviation,
  robustSigma,
  robustSigmaFromDifferences,
  theilSenSlope,
  pooledTheilSenSlope,
  MAD_TO_SIGMA,
} from "@/lib/signal/robust-stats";
import { seededNormal } from "./seeded-normal";

describe("median and MAD", () => {
  const draw = seededNormal(99);
  const odd = Array.from({ length: 101 }, () => 5 + 2 * draw());
  const even = Array.from({ length: 100 }, () => -3 + draw() ** 3);

  it("agree with simple-statistics", () => {
    // simple-statistics median / medianAbsoluteDeviation [general-purpose library]
    for (const xs of [odd, even, [4], [1, 2], [1, 1, 2, 2, 4, 6, 9]]) {
      expect(median(xs)).toBeCloseTo(ss.median(xs), 12);
      expect(medianAbsoluteDeviation(xs)).toBeCloseTo(ss.medianAbsoluteDeviation(xs), 12);
    }
    // simple-statistics' documented example: MAD of [1, 1, 2, 2, 4, 6, 9] is 1.
    expect(medianAbsoluteDeviation([1, 1, 2, 2, 4, 6, 9])).toBe(1);
  });

  it("does not reorder its input and refuses an empty list", () => {
    const xs = [3, 1, 2];
    median(xs);
    expect(xs).toEqual([3, 1, 2]);
    expect(() => median([])).toThrow(RangeError);
  });

  it("scales the MAD by 1 / Φ⁻¹(3/4)", () => {
    // simple-statistics probit (inverse normal CDF) [general-purpose library]; its approximation
    // gives 1.48266, the exact 1/0.6744898 is 1.48260, so compare to 3 decimals.
    expect(MAD_TO_SIGMA).toBeCloseTo(1 / ss.probit(0.75), 3);
  });

  it("robust σ of normal noise is near its standard deviation", () => {
    // Seeded N(0, 1.5²), n = 20000: 1.4826·MAD estimates σ (SE ≈ 1.2 %); simple-statistics sample sd as the yardstick.
    const sd = 1.5;
    const xs = Array.from({ length: 20000 }, () => sd * draw());
    expect(robustSigma(xs) / ss.sampleStandardDeviation(xs)).toBeCloseTo(1, 1);
    expect(Math.abs(robustSigma(xs) / sd - 1)).toBeLessThan(0.04);
  });

  it("σ from successive differences ignores a step and a trend", () => {
    // Seeded N(0, 0.01²) noise on a 0.002-a-sample ramp with a +1 step half-way [computed]
    const xs = Array.from({ length: 4000 }, (_, i) => 0.002 * i + (i >= 2000 ? 1 : 0) + 0.01 * draw());
    expect(Math.abs(robustSigmaFromDifferences(xs) / 0.01 - 1)).toBeLessThan(0.06);
    // The plain robust σ is swamped by the ramp and the step.
    expect(robustSigma(xs)).toBeGreaterThan(1);
  });
});

describe("Theil–Sen slope", () => {
  it("reproduces Sen's (1968) example: slope 4, intercept 6", () => {
    // Sen (1968) example as checked in SciPy's test suite for scipy.stats.theilslopes; our intercept
    // is median(y − slope·x), SciPy's method="joint", which gives 6.0 there [published].
    const x = [1, 2, 3, 4, 10, 12, 18];
    const y = [9, 15, 19, 20, 45, 55, 78];
    const fit = theilSenSlope(x.map((xi, i) => ({ x: xi, y: y[i] })));
    expect(fit?.slope).toBeCloseTo(4, 12);
    expect(fit?.intercept).toBeCloseTo(6, 12);
  });

  it("gives slope 0.5 and intercept 0 for y = [0, 1, 1]", () => {
    // SciPy's theilslopes test, method="joint" [published]
    const fit = theilSenSlope([0, 1, 1].map((y, x) => ({ x, y })));
    expect(fit?.slope).toBeCloseTo(0.5, 12);
    expect(fit?.intercept).toBeCloseTo(0, 12);
  });

  it("matches simple-statistics' least squares on noise-free data", () => {
    // simple-statistics linearRegression [general-purpose library]; on an exact line both estimators coincide.
    const points = [0.3, 1.1, 2.0, 3.7, 5.2, 8.8, 9.1, 12.4].map((x) => ({ x, y: -37.5 * x + 1204 }));
    const ols = ss.linearRegression(points.map((p) => [p.x, p.y]));
    const fit = theilSenSlope(points);
    expect(fit?.slope).toBeCloseTo(ols.m, 9);
    expect(fit?.intercept).toBeCloseTo(ols.b, 9);
  });

  it("keeps the true slope with gross outliers that pull least squares away", () => {
    // Line y = 2x + 1 with 2 of 20 points wrecked: 37 of 190 pairwise slopes are contaminated, fewer
    // than half, so the median is exact [computed]; simple-statistics' least squares is pulled off.
    const points = Array.from({ length: 20 }, (_, x) => ({ x, y: 2 * x + 1 }));
    points[5].y = 500;
    points[15].y = -400;
    const fit = theilSenSlope(points);
    expect(fit?.slope).toBeCloseTo(2, 12);
    expect(fit?.intercept).toBeCloseTo(1, 12);
    expect(Math.abs(ss.linearRegression(points.map((p) => [p.x, p.y])).m - 2)).toBeGreaterThan(5);
  });

  it("is null without two distinct x values, and skips pairs sharing an x", () => {
    expect(theilSenSlope([])).toBeNull();
    expect(theilSenSlope([{ x: 1, y: 2 }, { x: 1, y: 5 }])).toBeNull();
    // Pairs at x = 0 carry no slope; the remaining slopes are 1, 3 → median 2 [computed by hand].
    expect(theilSenSlope([{ x: 0, y: 0 }, { x: 0, y: 2 }, { x: 1, y: 3 }])?.slope).toBeCloseTo(2, 12);
  });
});

describe("pooled Theil–Sen slope", () => {
  it("recovers the common slope of segments with different offsets", () => {
    // Two exact lines of slope −40 (a tank before and after a refill) [computed]. Pooling all points
    // into one Theil–Sen fit would count the refill jump; within-group pairs do not.
    const before = Array.from({ length: 10 }, (_, i) => ({ x: i, y: 900 - 40 * i }));
    const after = Array.from({ length: 10 }, (_, i) => ({ x: 12 + i, y: 1500 - 40 * i }));
    expect(pooledTheilSenSlope([before, after])).toBeCloseTo(-40, 12);
    expect(theilSenSlope([...before, ...after])?.slope).not.toBeCloseTo(-40, 0);
    expect(pooledTheilSenSlope([[{ x: 1, y: 1 }], []])).toBeNull();
  });
});
