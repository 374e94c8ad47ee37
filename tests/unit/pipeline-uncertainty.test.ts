import { describe, it, expect } from "vitest";
import { standardDeviation } from "simple-statistics";
import { burstUncertainty, combineInQuadrature, quantisationUncertainty, temperatureUncertainty } from "@/lib/worker/compute/uncertainty";
import { mulberry32, seededNormal } from "./seeded-normal";

describe("distance uncertainty", () => {
  it("reads a quantisation step as a rectangular distribution, q/√12 (GUM §4.3.7), as a seeded simulation agrees", () => {
    const q = 0.0000858; // 0.0858 mm of range a tick at 16 MHz / 8 and 20 °C (REFERENCES.md §2)
    const uniform = mulberry32(7);
    const errors = Array.from({ length: 20_000 }, () => (uniform() - 0.5) * q);
    expect(quantisationUncertainty(q)).toBeCloseTo(q / Math.sqrt(12), 15);
    expect(Math.abs(standardDeviation(errors) / quantisationUncertainty(q) - 1)).toBeLessThan(0.02);
  });

  it("turns a temperature error into distance: a 20 K error is about 7 cm at 2 m (REFERENCES.md §2, computed)", () => {
    expect(Math.abs(temperatureUncertainty(2, 20, 20) - 0.07)).toBeLessThan(0.002);
    // About 0.18 % a kelvin (REFERENCES.md §2).
    expect(temperatureUncertainty(1, 20, 1)).toBeCloseTo(0.0017, 4);
  });

  it("rates a burst's median by √(π/2)·σ/√n, which a seeded simulation of medians of 25 pings agrees with within 10 %", () => {
    const normal = seededNormal(11);
    const sigmaUs = 10;
    const n = 25;
    const c = 343.2;
    const medians = Array.from({ length: 4000 }, () => {
      const pings = Array.from({ length: n }, () => sigmaUs * normal()).sort((a, b) => a - b);
      return pings[(n - 1) / 2];
    });
    const simulatedM = (standardDeviation(medians) * 1e-6 * c) / 2;
    // MAD of a normal sample is σ/1.4826.
    const predicted = burstUncertainty(sigmaUs / 1.4826, n, c);
    expect(Math.abs(predicted / simulatedM - 1)).toBeLessThan(0.1);
    expect(burstUncertainty(5, 1, c)).toBe(0);
  });

  it("adds independent parts in quadrature (GUM §5.1)", () => {
    expect(combineInQuadrature([0.003, 0.004])).toBeCloseTo(0.005, 15);
    expect(combineInQuadrature([])).toBe(0);
  });
});
