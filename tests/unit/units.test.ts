import { describe, it, expect } from "vitest";
import { unit as mathUnit } from "mathjs";
import { convert, differenceFromSi, fromSi, LITRES_PER_US_GALLON, METRES_PER_FOOT, toSi } from "@/lib/units/units";
import { parseLocaleNumber, parseQuantity } from "@/lib/units/parse";

// Exact definitions, NIST SP 811 Appendix B and Handbook 44 Appendix C (REFERENCES.md §7; appendix letters
// from memory): 1 in = 25.4 mm, 1 ft = 0.3048 m, 1 US gal = 231 in³ = 3.785 411 784 L, °F = °C·9/5 + 32.
describe("unit conversions", () => {
  it("holds the exact definitions", () => {
    expect(METRES_PER_FOOT).toBeCloseTo(0.3048, 15);
    expect(LITRES_PER_US_GALLON).toBeCloseTo(3.785411784, 12);
    expect(toSi(1, "in")).toBeCloseTo(0.0254, 15);
    expect(fromSi(100, "degF")).toBeCloseTo(212, 12);
    expect(toSi(32, "degF")).toBeCloseTo(0, 12);
    expect(toSi(-40, "degF")).toBeCloseTo(-40, 12);
  });

  it("agrees with mathjs in both directions", () => {
    const cases: [number, Parameters<typeof convert>[1], Parameters<typeof convert>[2], string, string][] = [
      [1421.8, "gal", "L", "gallon", "L"],
      [2.6, "m", "ft", "m", "ft"],
      [8.5, "ft", "m", "ft", "m"],
      [6, "mm", "in", "mm", "inch"],
      [1, "m3", "gal", "m^3", "gallon"],
      [18.3, "degC", "degF", "degC", "degF"],
      [-4, "degF", "degC", "degF", "degC"],
    ];
    for (const [v, from, to, mFrom, mTo] of cases) {
      expect(convert(v, from, to)).toBeCloseTo(mathUnit(v, mFrom).toNumber(mTo), 9);
      expect(convert(convert(v, from, to), to, from)).toBeCloseTo(v, 9);
    }
  });

  it("REFERENCES.md §3: a vertical cylinder D = 132 in, h = 24 in holds 1 421.80 US gal (computed)", () => {
    const litres = Math.PI * (toSi(132, "in") / 2) ** 2 * toSi(24, "in") * 1000;
    expect(fromSi(litres, "gal")).toBeCloseTo(1421.8, 1);
  });

  it("converts an uncertainty without the offset: 1 K is 1.8 °F of difference, 8 mm is 0.315 in", () => {
    expect(differenceFromSi(1, "degF")).toBeCloseTo(mathUnit(1, "K").toNumber("degF") - mathUnit(0, "K").toNumber("degF"), 12);
    expect(differenceFromSi(0.008, "in")).toBeCloseTo(0.008 / 0.0254, 12);
    expect(() => convert(1, "m", "L")).toThrow(RangeError);
  });
});

describe("parsing what a person typed", () => {
  it("reads the locale's decimal separator and groups of three", () => {
    expect(parseLocaleNumber("2,45", "de-DE")).toBe(2.45);
    expect(parseLocaleNumber("1.500,5", "de-DE")).toBe(1500.5);
    expect(parseLocaleNumber("1 500,5", "fr-FR")).toBe(1500.5);
    expect(parseLocaleNumber("1\u202f500,5", "fr-FR")).toBe(1500.5);
    expect(parseLocaleNumber("2.45", "en-US")).toBe(2.45);
    expect(parseLocaleNumber("12,480", "en-US")).toBe(12480);
    expect(parseLocaleNumber("\u22123.5", "en-GB")).toBe(-3.5);
    expect(parseLocaleNumber(",5", "de-DE")).toBe(0.5);
  });

  it("refuses what is ambiguous or not a number", () => {
    // In English a comma groups thousands: "1,5" is neither 1.5 nor 15.
    expect(parseLocaleNumber("1,5", "en-US")).toBeNull();
    expect(parseLocaleNumber("2.45", "de-DE")).toBeNull();
    expect(parseLocaleNumber("abc", "en-US")).toBeNull();
  });

  it("reads a value in the field's unit or in the unit typed, into SI", () => {
    expect(parseQuantity("2,45", { quantity: "length", locale: "de-DE", unit: "m" })).toEqual({ ok: true, valueSi: 2.45, unit: "m" });
    const feetInches = parseQuantity("8 ft 3.5 in", { quantity: "length", locale: "en-US", unit: "ft" });
    expect(feetInches.ok && feetInches.valueSi).toBeCloseTo(mathUnit(8, "ft").toNumber("m") + mathUnit(3.5, "inch").toNumber("m"), 12);
    const primes = parseQuantity(`8' 3.5"`, { quantity: "length", locale: "en-US", unit: "ft" });
    expect(primes.ok && primes.valueSi).toBeCloseTo(2.5273, 4);
    const gallons = parseQuantity("300 gal", { quantity: "volume", locale: "en-US", unit: "gal" });
    expect(gallons.ok && gallons.valueSi).toBeCloseTo(mathUnit(300, "gallon").toNumber("L"), 9);
    const f = parseQuantity("68 °F", { quantity: "temperature", locale: "en-US", unit: "degF" });
    expect(f.ok && f.valueSi).toBeCloseTo(20, 12);
    expect(parseQuantity("1 500 L", { quantity: "volume", locale: "en-GB", unit: "L" })).toEqual({ ok: true, valueSi: 1500, unit: "L" });
    expect(parseQuantity("-5,5 °C", { quantity: "temperature", locale: "de-DE", unit: "degC" })).toEqual({ ok: true, valueSi: -5.5, unit: "degC" });
  });

  it("says what is wrong instead of guessing", () => {
    expect(parseQuantity("", { quantity: "length", locale: "en-US", unit: "m" }).ok).toBe(false);
    expect(parseQuantity("3 L", { quantity: "length", locale: "en-US", unit: "m" })).toMatchObject({ ok: false, message: expect.stringMatching(/not a length/) });
    expect(parseQuantity("2,45 m", { quantity: "length", locale: "en-US", unit: "m" })).toMatchObject({ ok: false, message: expect.stringMatching(/decimal separator "\."/) });
    expect(parseQuantity("2 m 3 m", { quantity: "length", locale: "en-US", unit: "m" }).ok).toBe(false);
    expect(parseQuantity("3 parsecs", { quantity: "length", locale: "en-US", unit: "m" }).ok).toBe(false);
  });
});
