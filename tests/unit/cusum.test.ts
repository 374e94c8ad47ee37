import { describe, it, expect } from "vitest";
import { mean, standardDeviation, cumulativeStdNormalProbability } from "simple-statistics";
import { createCusum, runCusum, detectDrift, type CusumOptions } from "@/lib/signal/cusum";
import { seededNormal, averageRunLength } from "./seeded-normal";

// Montgomery, Introduction to Statistical Quality Control, 7th ed., §9.1.1, Table 9.2 (REFERENCES.md §5).
const MONTGOMERY_DATA = [
  9.45, 7.99, 9.29, 11.66, 12.16, 10.18, 8.04, 11.46, 9.2, 10.34, 9.03, 11.47, 10.51, 9.4, 10.08, 9.37, 10.62, 10.31,
  8.52, 10.84, 10.9, 9.33, 12.29, 11.5, 10.6, 11.08, 10.38, 11.62, 11.31, 10.52,
];
const MONTGOMERY_C_PLUS = [
  0, 0, 0, 1.16, 2.82, 2.5, 0.04, 1.0, 0, 0, 0, 0.97, 0.98, 0, 0, 0, 0.12, 0, 0, 0.34, 0.74, 0, 1.79, 2.79, 2.89, 3.47,
  3.35, 4.47, 5.28,
];
const MONTGOMERY_OPTIONS: CusumOptions = { mean: 10, sigma: 1, k: 0.5, h: 5 };

describe("tabular CUSUM against Montgomery Table 9.2", () => {
  const run = runCusum(MONTGOMERY_DATA, MONTGOMERY_OPTIONS);

  it("reproduces C⁺ for periods 1–29 to ±0.01", () => {
    // Montgomery Table 9.2 [published]
    MONTGOMERY_C_PLUS.forEach((expected, i) => expect(run.steps[i].cPlus).toBeCloseTo(expected, 2));
  });

  it("signals first at period 29 with N⁺ = 7, so the run began at period 23, new mean ≈ 11.25", () => {
    // Montgomery Table 9.2 and §9.1.1 text [published]; onset = 29 − 7 + 1 [computed]
    expect(run.firstSignal).not.toBeNull();
    expect(run.firstSignal?.index).toBe(28);
    expect(run.firstSignal?.direction).toBe("up");
    expect(run.steps[28].nPlus).toBe(7);
    expect(run.firstSignal?.onsetIndex).toBe(22);
    expect(run.firstSignal?.newMean).toBeCloseTo(11.25, 2);
    expect(run.steps.slice(0, 28).every((s) => s.signal === null)).toBe(true);
  });

  it("mirrors to the lower side: C⁻ of 20 − x equals C⁺ of x and signals down at ≈ 8.75", () => {
    // Montgomery Table 9.2 reflected about μ₀ = 10 [computed from the published table]
    const mirrored = runCusum(
      MONTGOMERY_DATA.map((x) => 20 - x),
      MONTGOMERY_OPTIONS,
    );
    MONTGOMERY_C_PLUS.forEach((expected, i) => expect(mirrored.steps[i].cMinus).toBeCloseTo(expected, 2));
    expect(mirrored.firstSignal).toMatchObject({ index: 28, onsetIndex: 22, direction: "down" });
    expect(mirrored.firstSignal?.newMean).toBeCloseTo(8.75, 2);
  });

  it("resumes from a saved state exactly where it stopped", () => {
    // Montgomery Table 9.2 [published]: split at period 15, the second half must still reach 5.28.
    const first = createCusum(MONTGOMERY_OPTIONS);
    MONTGOMERY_DATA.slice(0, 15).forEach((x) => first.step(x));
    const resumed = createCusum(MONTGOMERY_OPTIONS, first.state());
    const steps = MONTGOMERY_DATA.slice(15, 29).map((x) => resumed.step(x));
    expect(steps[steps.length - 1].cPlus).toBeCloseTo(5.28, 2);
    expect(steps[steps.length - 1].signal).toBe("up");
  });

  it("rejects a non-positive sigma or h", () => {
    expect(() => createCusum({ ...MONTGOMERY_OPTIONS, sigma: 0 })).toThrow(RangeError);
    expect(() => createCusum({ ...MONTGOMERY_OPTIONS, h: -1 })).toThrow(RangeError);
  });
});

describe("seeded normal generator used by the Monte Carlo checks", () => {
  it("gives standard normal deviates", () => {
    const draw = seededNormal(12345);
    const xs = Array.from({ length: 20000 }, draw);
    // Standard normal: mean 0, sd 1 (SE 0.007), P(|Z| > 1.96) = 5 % via simple-statistics' Φ.
    expect(Math.abs(mean(xs))).toBeLessThan(0.03);
    expect(standardDeviation(xs)).toBeCloseTo(1, 1);
    const tail = xs.filter((x) => Math.abs(x) > 1.96).length / xs.length;
    expect(tail).toBeCloseTo(2 * (1 - cumulativeStdNormalProbability(1.96)), 2);
  });
});

// Zero-state ARL of the two-sided chart with the mean shifted by `shift`σ from the first sample.
function cusumArl(h: number, shift: number, runs: number, seed: number): number {
  const draw = seededNormal(seed);
  return averageRunLength(runs, () => {
    const chart = createCusum({ mean: 0, sigma: 1, k: 0.5, h });
    return () => chart.step(draw() + shift).signal !== null;
  });
}

describe("CUSUM average run lengths by seeded Monte Carlo (±10 %)", () => {
  // Run lengths are roughly geometric (sd ≈ ARL), so n runs give a relative SE ≈ 1/√n: 2500 runs
  // give 2 %, putting ±10 % five standard errors away. Shifted charts spread less (sd < ARL), so
  // 1000 runs keep them within about 3 %.
  it.each([
    // Lucas & Crosier (1982), Table 1, k = 0.5 [published, REFERENCES.md §5]
    { h: 4, shift: 0, arl: 168, runs: 2500 },
    { h: 4, shift: 0.5, arl: 26.6, runs: 1000 },
    { h: 4, shift: 1, arl: 8.38, runs: 1000 },
    { h: 4, shift: 2, arl: 3.34, runs: 1000 },
    { h: 4, shift: 3, arl: 2.19, runs: 1000 },
    // h = 5, 1σ [published, REFERENCES.md §5]
    { h: 5, shift: 1, arl: 10.4, runs: 1000 },
  ])("h = $h, shift $shiftσ → ARL $arl", ({ h, shift, arl, runs }) => {
    const estimate = cusumArl(h, shift, runs, 1000 + Math.round(shift * 10) + h);
    expect(Math.abs(estimate / arl - 1)).toBeLessThan(0.1);
  });
});

describe("detectDrift", () => {
  const START = Date.UTC(2026, 2, 14, 0, 0, 0);
  const HOUR = 3_600_000;
  // Montgomery Table 9.2 as residuals about μ₀ = 10, one an hour.
  const residuals = MONTGOMERY_DATA.map((x, i) => ({ at: new Date(START + i * HOUR), value: x - 10 }));

  it("dates the onset and sizes the shift as Montgomery's example does", () => {
    // Montgomery Table 9.2 [published]: signal at period 29, run from period 23, new mean ≈ 11.25 → shift 1.25σ.
    const verdict = detectDrift(residuals, { sigma: 1, k: 0.5, h: 5 });
    expect(verdict).not.toBeNull();
    expect(verdict?.drifting).toBe(true);
    expect(verdict?.direction).toBe("up");
    expect(verdict?.onsetAt?.getTime()).toBe(START + 22 * HOUR);
    expect(verdict?.detectedAt?.getTime()).toBe(START + 28 * HOUR);
    expect(verdict?.magnitude).toBeCloseTo(1.25, 2);
  });

  it("sorts residuals by time before charting", () => {
    // Same published case, shuffled deterministically.
    const shuffled = [...residuals].reverse();
    expect(detectDrift(shuffled, { sigma: 1 })?.onsetAt?.getTime()).toBe(START + 22 * HOUR);
  });

  it("estimates σ from successive differences and catches a 2σ step down", () => {
    // Seeded N(0, 0.004²) residuals with a −8 mm step after sample 60; σ from differences should be near 4 mm.
    const draw = seededNormal(777);
    const stepped = Array.from({ length: 120 }, (_, i) => ({ at: START + i * HOUR, value: 0.004 * draw() - (i >= 60 ? 0.008 : 0) }));
    const verdict = detectDrift(stepped);
    expect(verdict?.sigma).toBeGreaterThan(0.0034);
    expect(verdict?.sigma).toBeLessThan(0.0046);
    expect(verdict?.drifting).toBe(true);
    expect(verdict?.direction).toBe("down");
    const onsetIndex = ((verdict?.onsetAt?.getTime() ?? 0) - START) / HOUR;
    expect(Math.abs(onsetIndex - 60)).toBeLessThanOrEqual(4);
    expect(verdict?.magnitude).toBeGreaterThan(0.006);
    expect(verdict?.magnitude).toBeLessThan(0.011);
  });

  it("stays quiet on in-control residuals and gives no verdict on too few or constant ones", () => {
    // Page's recursion: values within ±K of μ₀ never accumulate, however long the run.
    const steady = Array.from({ length: 500 }, (_, i) => ({ at: START + i * HOUR, value: i % 2 === 0 ? 0.45 : -0.45 }));
    expect(detectDrift(steady, { sigma: 1 })).toMatchObject({ drifting: false, onsetAt: null, magnitude: null });
    expect(detectDrift(residuals.slice(0, 5))).toBeNull();
    const flat = Array.from({ length: 20 }, (_, i) => ({ at: START + i * HOUR, value: 0.5 }));
    expect(detectDrift(flat)).toBeNull();
    // With a resolution floor the flat residuals can be judged: 0.5 sits 5σ above 0 with σ = 0.1.
    expect(detectDrift(flat, { minSigma: 0.1 })?.drifting).toBe(true);
  });
});
