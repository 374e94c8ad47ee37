import { createRequire } from "node:module";
import { describe, it, expect } from "vitest";
import { evaluate, gasConstant, type Unit } from "mathjs";
import {
  speedOfSoundDry,
  speedOfSoundIso9613,
  speedOfSoundCramer,
  speedOfSoundFor,
  saturationVapourPressurePa,
  waterVapourMoleFraction,
} from "@/lib/physics/speed-of-sound";

// psychrolib ships no type declarations; only the two members used here are described.
interface Psychrometrics {
  SI: number;
  SetUnitSystem(system: number): void;
  GetSatVapPres(tDryBulbC: number): number;
}
const psychrolib = createRequire(import.meta.url)("psychrolib") as Psychrometrics;
psychrolib.SetUnitSystem(psychrolib.SI);

// REFERENCES.md §1 table [computed from each formula]: T °C, 331.3·√(1+T/273.15), 331.3 + 0.606·T, ISO 9613-1.
const SPEED_TABLE: Array<[number, number, number, number]> = [
  [-20, 318.941, 319.18, 318.927],
  [-10, 325.179, 325.24, 325.165],
  [0, 331.3, 331.3, 331.286],
  [10, 337.31, 337.36, 337.296],
  [20, 343.215, 343.42, 343.2],
  [25, 346.129, 346.45, 346.114],
  [30, 349.019, 349.48, 349.005],
  [40, 354.729, 355.54, 354.714],
];

function unitSpeed(expression: string): number {
  return (evaluate(expression) as Unit).toNumber("m/s");
}

describe("dry-air and ISO 9613-1 formulas", () => {
  it.each(SPEED_TABLE)("%d °C matches the dry-air column (REFERENCES.md §1, computed)", (t, dry) => {
    expect(speedOfSoundDry(t)).toBeCloseTo(dry, 3);
  });

  it.each(SPEED_TABLE)("%d °C matches the ISO 9613-1 Annex A column (REFERENCES.md §1, computed)", (t, _dry, _linear, iso) => {
    expect(speedOfSoundIso9613(t)).toBeCloseTo(iso, 3);
  });

  it.each(SPEED_TABLE)("%d °C: the first-order column is 331.3 plus the formula's slope at 0 °C times T (REFERENCES.md §1)", (t, _dry, linear) => {
    // The published expansion c ≈ 331.3 + 0.606·T is the tangent of the dry formula at 0 °C.
    const slope = (speedOfSoundDry(0.001) - speedOfSoundDry(-0.001)) / 0.002;
    expect(slope).toBeCloseTo(0.606, 3);
    expect(331.3 + slope * t).toBeCloseTo(linear, 1);
  });

  it("reproduces U.S. Standard Atmosphere 1976: 340.294 m/s at 288.15 K via √(γRT/M) in mathjs units", () => {
    // U.S. Standard Atmosphere 1976 [published]: γ = 1.4, R* = 8.31432 J/(mol·K), M = 0.0289644 kg/mol.
    const usStandard = unitSpeed("sqrt(1.4 * 8.31432 J / (mol K) * 288.15 K / (0.0289644 kg / mol))");
    expect(usStandard).toBeCloseTo(340.294, 3);
    // mathjs's own (CODATA) gas constant moves the result by under 0.005 m/s.
    const codataR = gasConstant.toNumber("J / (mol K)");
    expect(unitSpeed(`sqrt(1.4 * ${codataR} J / (mol K) * 288.15 K / (0.0289644 kg / mol))`)).toBeCloseTo(340.294, 2);
    // The product's formulas are rounded ideal-gas forms: both land within 0.05 m/s of the standard at 15 °C.
    expect(Math.abs(speedOfSoundDry(15) - usStandard)).toBeLessThan(0.05);
    expect(Math.abs(speedOfSoundIso9613(15) - usStandard)).toBeLessThan(0.05);
  });

  it("the 331.3 m/s constant is √(γRT/M) at 273.15 K rounded (U.S. Standard Atmosphere 1976 constants, mathjs)", () => {
    const atZero = unitSpeed("sqrt(1.4 * 8.31432 J / (mol K) * 273.15 K / (0.0289644 kg / mol))");
    expect(Math.abs(speedOfSoundDry(0) - atZero)).toBeLessThan(0.05);
  });
});

describe("Cramer (1993) with Davis (1992) water vapour", () => {
  // REFERENCES.md §1 check values [computed from Cramer], 101 325 Pa, 400 ppm CO₂, ±0.002 m/s.
  it.each([
    [0, 0, 331.448],
    [20, 0, 343.359],
    [25, 0, 346.268],
    [30, 0, 349.148],
    [20, 50, 343.987],
    [20, 100, 344.614],
  ])("%d °C at %d %% RH is %d m/s", (tempC, rh, expected) => {
    const c = speedOfSoundCramer({ tempC, relativeHumidityPct: rh });
    expect(Math.abs(c - expected)).toBeLessThanOrEqual(0.002);
  });

  it("uses the default pressure and CO₂ of the check values (REFERENCES.md §1)", () => {
    expect(speedOfSoundCramer({ tempC: 20, relativeHumidityPct: 50 })).toBe(
      speedOfSoundCramer({ tempC: 20, relativeHumidityPct: 50, pressurePa: 101325, co2ppm: 400 }),
    );
  });

  it.each([0, 5, 10, 15, 20, 25, 30])(
    "Davis saturation vapour pressure at %d °C agrees with psychrolib (ASHRAE) within 0.2 %%",
    (tempC) => {
      // psychrolib implements the ASHRAE Handbook (Hyland–Wexler) correlation, an independent fit.
      const ashrae = psychrolib.GetSatVapPres(tempC);
      expect(Math.abs(saturationVapourPressurePa(tempC) - ashrae) / ashrae).toBeLessThan(0.002);
    },
  );

  it("water-vapour mole fraction is RH·f·psv/p, with f within 0.5 % of 1 (psychrolib psv, Davis f)", () => {
    const ashrae = psychrolib.GetSatVapPres(20);
    const xw = waterVapourMoleFraction(20, 50, 101325);
    const plain = (0.5 * ashrae) / 101325;
    expect(xw / plain).toBeGreaterThan(1);
    expect(xw / plain).toBeLessThan(1.005);
  });
});

describe("choosing the model for a reading", () => {
  it("uses Cramer when humidity is known inside 0–30 °C (REFERENCES.md §1 check values)", () => {
    const choice = speedOfSoundFor({ tempC: 20, humidityPct: 50 });
    expect(choice.model).toBe("cramer");
    expect(Math.abs(choice.speedMs - 343.987)).toBeLessThanOrEqual(0.002);
    expect(speedOfSoundFor({ tempC: 0, humidityPct: 0 }).model).toBe("cramer");
    expect(Math.abs(speedOfSoundFor({ tempC: 30, humidityPct: 0 }).speedMs - 349.148)).toBeLessThanOrEqual(0.002);
  });

  it("falls back to the dry formula without humidity or outside Cramer's range (REFERENCES.md §1 table)", () => {
    expect(speedOfSoundFor({ tempC: 20 })).toEqual({ speedMs: speedOfSoundDry(20), model: "dry" });
    expect(speedOfSoundFor({ tempC: 20 }).speedMs).toBeCloseTo(343.215, 3);
    expect(speedOfSoundFor({ tempC: 20, humidityPct: null }).model).toBe("dry");
    expect(speedOfSoundFor({ tempC: 40, humidityPct: 50 }).speedMs).toBeCloseTo(354.729, 3);
    expect(speedOfSoundFor({ tempC: 40, humidityPct: 50 }).model).toBe("dry");
    expect(speedOfSoundFor({ tempC: -10, humidityPct: 50 }).speedMs).toBeCloseTo(325.179, 3);
  });

  it("ignores a humidity that is not a percentage", () => {
    expect(speedOfSoundFor({ tempC: 20, humidityPct: 120 }).model).toBe("dry");
    expect(speedOfSoundFor({ tempC: 20, humidityPct: -1 }).model).toBe("dry");
    expect(speedOfSoundFor({ tempC: 20, humidityPct: Number.NaN }).model).toBe("dry");
  });
});
