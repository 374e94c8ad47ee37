import { describe, it, expect } from "vitest";
import { roundMeasurement, roundToDecimals, roundUncertainty } from "@/lib/format/precision";

describe("display precision from uncertainty (GUM, JCGM 100:2008, §7.2)", () => {
  it("GUM §7.2.2: m_S = 100.021 47 g with u_c = 0.35 mg keeps five decimals of the gram", () => {
    expect(roundMeasurement(100.02147, 0.00035)).toEqual({ value: 100.02147, uncertainty: 0.00035, decimals: 5 });
  });

  it("GUM §7.2.6: y = 10.057 62 Ω with u_c = 27 mΩ is written 10.058 Ω", () => {
    expect(roundMeasurement(10.05762, 0.027)).toEqual({ value: 10.058, uncertainty: 0.027, decimals: 3 });
  });

  it("GUM §7.2.6: 10.47 mΩ may be rounded up to 11 mΩ, but common sense keeps 28.05 kHz at 28 kHz", () => {
    expect(roundUncertainty(10.47, { significantDigits: 2, direction: "up" })).toMatchObject({ value: 11, decimals: 0 });
    expect(roundUncertainty(28.05, { significantDigits: 2, direction: "up" })).toMatchObject({ value: 28, decimals: 0 });
    expect(roundUncertainty(10.47, { significantDigits: 2 })).toMatchObject({ value: 10, decimals: 0 });
  });

  it("REFERENCES.md §7 (computed): d = 2.00128 m with U = 7.66 mm is shown 2.001 m ± 8 mm, not 2.0013 m", () => {
    expect(roundMeasurement(2.00128, 0.00766)).toEqual({ value: 2.001, uncertainty: 0.008, decimals: 3 });
  });

  // Particle Data Group, Review of Particle Physics, Introduction, "Rounding" (from memory):
  // 0.827 ± 0.119 → 0.83 ± 0.12; 0.827 ± 0.367 → 0.8 ± 0.4; leading digits 950–999 → 1.0 (two digits).
  it("chooses one or two digits by the leading three (PDG's 354 rule, from memory)", () => {
    expect(roundMeasurement(0.827, 0.119)).toEqual({ value: 0.83, uncertainty: 0.12, decimals: 2 });
    expect(roundMeasurement(0.827, 0.367)).toEqual({ value: 0.8, uncertainty: 0.4, decimals: 1 });
    expect(roundUncertainty(0.98)).toEqual({ value: 1, decimals: 1, significantDigits: 2 });
    expect(roundUncertainty(0.0062)).toMatchObject({ value: 0.006, decimals: 3, significantDigits: 1 });
  });

  it("takes the digits asked for, carries 9.6 to 10 with one decimal fewer, and rounds to tens and hundreds", () => {
    expect(roundUncertainty(0.0062, { significantDigits: 2 })).toMatchObject({ value: 0.0062, decimals: 4 });
    expect(roundUncertainty(0.96, { significantDigits: 1 })).toMatchObject({ value: 1, decimals: 0 });
    expect(roundMeasurement(12_483, 367)).toEqual({ value: 12_500, uncertainty: 400, decimals: -2 });
    expect(roundToDecimals(12_483, -1)).toBe(12_480);
  });

  it("refuses an uncertainty that is not a positive number", () => {
    expect(() => roundUncertainty(0)).toThrow(RangeError);
    expect(() => roundUncertainty(Number.NaN)).toThrow(RangeError);
  });
});
