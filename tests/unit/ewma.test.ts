import { describe, it, expect } from "vitest";
import { evaluate } from "mathjs/number";
import { createEwma, runEwma, ewmaControlLimits, type EwmaOptions } from "@/lib/signal/ewma";
import { seededNormal, averageRunLength } from "./seeded-normal";

// Montgomery, Introduction to Statistical Quality Control, 7th ed., Table 9.2 data (REFERENCES.md §5).
const MONTGOMERY_DATA = [
  9.45, 7.99, 9.29, 11.66, 12.16, 10.18, 8.04, 11.46, 9.2, 10.34, 9.03, 11.47, 10.51, 9.4, 10.08, 9.37, 10.62, 10.31,
  8.52, 10.84, 10.9, 9.33, 12.29, 11.5, 10.6, 11.08, 10.38, 11.62, 11.31, 10.52,
];

describe("EWMA statistic and limits (Roberts 1959)", () => {
  const options: EwmaOptions = { mean: 10, sigma: 1, lambda: 0.1, L: 2.7 };

  it("matches the published limit formula evaluated by mathjs for i = 1…40", () => {
    // Roberts (1959) limits, REFERENCES.md §5 [published formula], evaluated independently with mathjs.
    for (let i = 1; i <= 40; i++) {
      const halfWidth = evaluate("L * sigma * sqrt(lambda / (2 - lambda) * (1 - (1 - lambda)^(2 i)))", {
        L: 2.7,
        sigma: 1,
        lambda: 0.1,
        i,
      }) as number;
      const { lower, upper } = ewmaControlLimits(i, options);
      expect(upper).toBeCloseTo(10 + halfWidth, 12);
      expect(lower).toBeCloseTo(10 - halfWidth, 12);
    }
  });

  it("gives z₁ = 9.945 and UCL₁ = 10.27 on Montgomery's data with λ = 0.1, L = 2.7", () => {
    // [computed] from Roberts' recursion with z₀ = μ₀; Montgomery's EWMA example on these data
    // shows the same first-period values (from memory).
    const run = runEwma(MONTGOMERY_DATA, options);
    expect(run.steps[0].z).toBeCloseTo(9.945, 3);
    expect(run.steps[0].upper).toBeCloseTo(10.27, 2);
    expect(run.steps[1].z).toBeCloseTo(0.1 * 7.99 + 0.9 * 9.945, 10);
  });

  it("widens its limits towards the asymptotic L·σ·√(λ/(2−λ))", () => {
    // Roberts (1959): (1 − λ)^{2i} → 0 [published formula]
    const asymptotic = 2.7 * Math.sqrt(0.1 / 1.9);
    expect(ewmaControlLimits(1, options).upper).toBeLessThan(ewmaControlLimits(5, options).upper);
    expect(ewmaControlLimits(500, options).upper - 10).toBeCloseTo(asymptotic, 10);
    expect(ewmaControlLimits(1, { ...options, asymptoticLimits: true }).upper - 10).toBeCloseTo(asymptotic, 10);
  });

  it("resumes from a saved state", () => {
    // Continuity of the recursion [computed]: a split run equals the whole run.
    const whole = runEwma(MONTGOMERY_DATA, options);
    const first = createEwma(options);
    MONTGOMERY_DATA.slice(0, 12).forEach((x) => first.step(x));
    const resumed = createEwma(options, first.state());
    const steps = MONTGOMERY_DATA.slice(12).map((x) => resumed.step(x));
    steps.forEach((s, j) => {
      expect(s.z).toBeCloseTo(whole.steps[12 + j].z, 12);
      expect(s.upper).toBeCloseTo(whole.steps[12 + j].upper, 12);
    });
  });

  it("reports the first signal and its direction", () => {
    // [computed] a 3σ step at i = 10 must push z above the upper limit; mirrored, below the lower.
    const data = Array.from({ length: 40 }, (_, i) => (i >= 10 ? 13 : 10));
    const up = runEwma(data, options);
    expect(up.firstSignal?.direction).toBe("up");
    expect(up.firstSignal?.index).toBeGreaterThanOrEqual(10);
    expect(up.steps.slice(0, 10).every((s) => s.signal === null)).toBe(true);
    expect(runEwma(data.map((x) => 20 - x), options).firstSignal?.direction).toBe("down");
  });

  it("rejects λ outside (0, 1]", () => {
    expect(() => createEwma({ ...options, lambda: 0 })).toThrow(RangeError);
    expect(() => createEwma({ ...options, lambda: 1.5 })).toThrow(RangeError);
  });
});

function ewmaArl(options: EwmaOptions, shift: number, runs: number, seed: number): number {
  const draw = seededNormal(seed);
  return averageRunLength(runs, () => {
    const chart = createEwma(options);
    return () => chart.step(draw() + shift).signal !== null;
  });
}

describe("EWMA average run lengths by seeded Monte Carlo (±10 %)", () => {
  // In control the run length is roughly geometric (sd ≈ ARL): 3000 runs give a relative SE of
  // 1.8 %, so ±10 % is over five standard errors away. The early, narrow time-varying limits
  // barely change ARL₀ (a first-sample false alarm is rare), so the published L holds for them too.
  it.each([
    // Chandrasekaran, English & Disney (1995) [published, REFERENCES.md §5]
    { lambda: 0.1, L: 2.8159, arl: 500, seed: 21 },
    { lambda: 0.25, L: 2.9985, arl: 500, seed: 22 },
  ])("λ = $lambda, L = $L → ARL₀ $arl", ({ lambda, L, arl, seed }) => {
    const estimate = ewmaArl({ mean: 0, sigma: 1, lambda, L }, 0, 3000, seed);
    expect(Math.abs(estimate / arl - 1)).toBeLessThan(0.1);
  });

  it("λ = 0.25, L = 2.9985, 1σ shift → ARL 11.07 with the asymptotic limits", () => {
    // Chandrasekaran et al. (1995) [published, REFERENCES.md §5]; the value is for fixed limits
    // (Lucas & Saccucci's 1990 table has 11.1 for L = 2.998, from memory). Run-length sd ≈ 7 here,
    // so 1500 runs give SE ≈ 1.7 %.
    const estimate = ewmaArl({ mean: 0, sigma: 1, lambda: 0.25, L: 2.9985, asymptoticLimits: true }, 1, 1500, 23);
    expect(Math.abs(estimate / 11.07 - 1)).toBeLessThan(0.1);
  });

  it("the time-varying limits catch a shift present from the start sooner", () => {
    // Same seed, same samples [computed]: narrower early limits can only signal earlier.
    const exact = ewmaArl({ mean: 0, sigma: 1, lambda: 0.25, L: 2.9985 }, 1, 1500, 23);
    const fixed = ewmaArl({ mean: 0, sigma: 1, lambda: 0.25, L: 2.9985, asymptoticLimits: true }, 1, 1500, 23);
    expect(exact).toBeLessThan(fixed);
  });
});
