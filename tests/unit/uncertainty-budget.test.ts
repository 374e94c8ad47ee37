import { describe, it, expect } from "vitest";
import { standardDeviation } from "simple-statistics";
import {
  burstMedianUncertaintyUs,
  DEFAULT_STATED_ACCURACY_M,
  distanceStandardUncertainty,
  rectangularUncertainty,
  resolutionUncertainty,
  temperatureSensitivityMPerK,
  timeSensitivityMPerUs,
  uncertaintyBudget,
  type DistanceUncertaintyInput,
} from "@/lib/uncertainty/budget";
import { AIR_TEMPERATURE_DRIFT_K_PER_H, AIR_TEMPERATURE_UNCERTAINTY_K, airTemperatureUncertaintyK } from "@/lib/uncertainty/air-temperature";
import { speedOfSoundDry } from "@/lib/physics/speed-of-sound";
import { mulberry32, seededNormal } from "./seeded-normal";

// Hand-worked example, REFERENCES.md §7 [computed there from the GUM's formulas, JCGM 100:2008 §5.1.2
// (law of propagation), §4.3.7 (rectangular a/√3), F.2.2.1 (resolution q/√12), §6.2–6.3 (k = 2)]:
// t = 11 662 µs at 20 °C → c = 343.215 m/s (dry-air formula), d = 2.00128 m.
//   air temperature, own sensor, u = 1 K:  ∂d/∂T = d/(2·T_K) = 2.00128/586.3 m/K → 3.413 mm
//   timer resolution 0.5 µs:               u = 0.5/√12 µs, ∂d/∂t = c/2          → 0.025 mm
//   transducer ±3 mm, rectangular:         u = 3/√3 mm, ∂d/∂δ = 1               → 1.732 mm
//   combined u_c = 3.828 mm; U (k = 2) = 7.66 mm.
// With a fixed site temperature doubted by 3 K instead: temperature part 10.24 mm, u_c = 10.39 mm, U = 20.77 mm.
const worked: DistanceUncertaintyInput = {
  rawDistanceM: 2.00128,
  speedMs: 343.215,
  tempC: 20,
  tempUncertaintyK: 1,
  tickUs: 0.5,
  burstSpreadUs: null,
  burstN: null,
  statedAccuracyM: 0.003,
  calibrationRmsM: null,
  calibrationScale: 1,
};

const mm = (m: number) => m * 1000;

describe("uncertainty budget after the GUM", () => {
  it("reproduces the hand-worked example part by part (REFERENCES.md §7, computed from JCGM 100:2008)", () => {
    const b = uncertaintyBudget(worked);
    const part = (name: string) => b.components.find((c) => c.part === name)!;
    expect(mm(part("air_temperature").contributionM)).toBeCloseTo(3.413, 3);
    expect(mm(part("timer").contributionM)).toBeCloseTo(0.025, 3);
    expect(mm(part("transducer").contributionM)).toBeCloseTo(1.732, 3);
    expect(mm(b.combinedM)).toBeCloseTo(3.828, 3);
    expect(b.coverageFactor).toBe(2);
    expect(mm(b.expandedM)).toBeCloseTo(7.66, 2);
    // The worker's scalar path gives the same u_c.
    expect(mm(distanceStandardUncertainty(worked))).toBeCloseTo(3.828, 3);
  });

  it("with a fixed site temperature doubted by 3 K: 10.24 mm, u_c 10.39 mm, U 20.77 mm (REFERENCES.md §7, computed)", () => {
    const b = uncertaintyBudget({ ...worked, tempUncertaintyK: 3 });
    expect(mm(b.components.find((c) => c.part === "air_temperature")!.contributionM)).toBeCloseTo(10.24, 2);
    expect(mm(b.combinedM)).toBeCloseTo(10.39, 2);
    expect(mm(b.expandedM)).toBeCloseTo(20.77, 2);
    expect(b.components.reduce((s, c) => s + c.varianceShare, 0)).toBeCloseTo(1, 12);
  });

  it("uses the GUM's standard forms: a/√3 (§4.3.7) and q/√12 (F.2.2.1)", () => {
    expect(rectangularUncertainty(3)).toBeCloseTo(1.7320508, 7);
    expect(resolutionUncertainty(0.5)).toBeCloseTo(0.1443376, 7);
  });

  it("has the sensitivity of the dry-air formula: ∂c/∂T = 0.5854 m/s per K at 20 °C (REFERENCES.md §7, computed)", () => {
    const t = 11_662e-6;
    // ∂d/∂T = (t/2)·∂c/∂T.
    expect(temperatureSensitivityMPerK(2.00128, 20) / (t / 2)).toBeCloseTo(0.5854, 3);
    // And a central difference of the published formula itself (lib/physics, checked against REFERENCES.md §1).
    const h = 0.01;
    const numeric = ((speedOfSoundDry(20 + h) - speedOfSoundDry(20 - h)) / (2 * h)) * (t / 2);
    expect(Math.abs(temperatureSensitivityMPerK(speedOfSoundDry(20) * t / 2, 20) - numeric)).toBeLessThan(1e-8);
    expect(timeSensitivityMPerUs(343.215)).toBeCloseTo(343.215e-6 / 2, 12);
  });

  it("agrees with a seeded Monte Carlo propagation of the distributions (the method of JCGM 101:2008) within 2 %", () => {
    const normal = seededNormal(5);
    const uniform = mulberry32(9);
    const tUs = 11_662;
    const samples = Array.from({ length: 40_000 }, () => {
      const T = 20 + normal() * 1;
      const t = tUs + (uniform() - 0.5) * 0.5;
      const transducer = (uniform() * 2 - 1) * 0.003;
      return (speedOfSoundDry(T) * t * 1e-6) / 2 + transducer;
    });
    expect(Math.abs(standardDeviation(samples) / distanceStandardUncertainty(worked) - 1)).toBeLessThan(0.02);
  });

  it("marks the transducer's trade default as a default and uses the channel's own value when it has one", () => {
    const own = uncertaintyBudget(worked).components.find((c) => c.part === "transducer")!;
    expect(own.isDefault).toBe(false);
    const fallback = uncertaintyBudget({ ...worked, statedAccuracyM: null }).components.find((c) => c.part === "transducer")!;
    expect(fallback.isDefault).toBe(true);
    // ±3 mm: a figure commonly stated for low-cost ultrasonic modules (from memory).
    expect(DEFAULT_STATED_ACCURACY_M).toBe(0.003);
    expect(fallback.contributionM).toBeCloseTo(0.003 / Math.sqrt(3), 12);
  });

  it("rates a burst's median by √(π/2)·1.4826·MAD/√n (Type A), which a seeded simulation of 25-ping medians agrees with within 10 %", () => {
    const normal = seededNormal(11);
    const sigmaUs = 10;
    const n = 25;
    const medians = Array.from({ length: 4000 }, () => {
      const pings = Array.from({ length: n }, () => sigmaUs * normal()).sort((a, b) => a - b);
      return pings[(n - 1) / 2];
    });
    // The MAD of normal data is σ/1.4826 (a standard constant).
    expect(Math.abs(burstMedianUncertaintyUs(sigmaUs / 1.4826, n) / standardDeviation(medians) - 1)).toBeLessThan(0.1);
    expect(burstMedianUncertaintyUs(5, 1)).toBe(0);
    const b = uncertaintyBudget({ ...worked, burstSpreadUs: sigmaUs / 1.4826, burstN: n });
    expect(b.components.find((c) => c.part === "burst")).toMatchObject({ type: "A", unit: "µs" });
  });

  it("adds the calibration fit's residual and scales the timed parts by the calibration scale", () => {
    const calibrated = uncertaintyBudget({ ...worked, calibrationRmsM: 0.004, calibrationScale: 1.01 });
    const part = (name: string) => calibrated.components.find((c) => c.part === name)!;
    expect(part("calibration").contributionM).toBeCloseTo(0.004, 12);
    expect(mm(part("air_temperature").contributionM)).toBeCloseTo(3.413 * 1.01, 3);
    expect(mm(part("transducer").contributionM)).toBeCloseTo(1.732, 3);
  });
});

describe("air temperature doubt by source", () => {
  const u = AIR_TEMPERATURE_UNCERTAINTY_K;
  it("takes the base value of the reading's own sensor, the site's fixed value and the default", () => {
    expect(airTemperatureUncertaintyK({ source: "reading" })).toBe(u.reading);
    expect(airTemperatureUncertaintyK({ source: "site_fixed" })).toBe(u.site_fixed);
    expect(airTemperatureUncertaintyK({ source: "default" })).toBe(u.default);
  });

  it("grows with the spread of the samples interpolated between and the age of the nearest (rectangular, GUM §4.3.7)", () => {
    expect(airTemperatureUncertaintyK({ source: "site_samples", spreadK: 0, ageS: 0 })).toBe(u.site_samples);
    // 6 K between the samples: half-width 3 K → √3 K, combined with the base in quadrature (computed).
    expect(airTemperatureUncertaintyK({ source: "site_samples", spreadK: 6, ageS: 0 })).toBeCloseTo(Math.sqrt(u.site_samples ** 2 + 3), 12);
    // An hour from the nearest sample: half-width of one hour's drift.
    const hour = airTemperatureUncertaintyK({ source: "site_samples", spreadK: 0, ageS: 3600 });
    expect(hour).toBeCloseTo(Math.sqrt(u.site_samples ** 2 + AIR_TEMPERATURE_DRIFT_K_PER_H ** 2 / 3), 12);
  });
});
