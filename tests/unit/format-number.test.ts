import { describe, it, expect } from "vitest";
import { unit as mathUnit } from "mathjs";
import { formatLength, formatNumber, formatTemperature, formatVolume } from "@/lib/format/number";

const NBSP = "\u00a0";
const NARROW = "\u202f";

describe("numbers in a locale", () => {
  // BIPM, The International System of Units, 9th ed. (2019), §5.4.3–5.4.4 [published]: a space between
  // number and unit, digits grouped in threes by a thin space, the decimal marker a point or a comma.
  it("uses the locale's decimal sign and groups thousands with a narrow no-break space", () => {
    expect(formatNumber(12480.5, 1, "en-US")).toBe(`12${NARROW}480.5`);
    expect(formatNumber(12480.5, 1, "de-DE")).toBe(`12${NARROW}480,5`);
    expect(formatNumber(1500, 0, "fr-FR")).toBe(`1${NARROW}500`);
    expect(formatNumber(-0.0004, 3, "en-GB")).toBe("0.000");
    expect(formatNumber(-3.5, 1, "en-GB")).toBe("\u22123.5");
    expect(formatNumber(12_483, -1, "en-GB")).toBe(`12${NARROW}480`);
  });
});

describe("figures in the viewer's units, to the precision the uncertainty supports", () => {
  it("REFERENCES.md §7 (computed): 2.00128 m with U = 7.66 mm reads 2.001 m ± 8 mm; with a decimal comma 2,001 m", () => {
    expect(formatLength(2.00128, 0.00766, { system: "si", locale: "en-GB" })).toBe(`2.001${NBSP}m ±${NBSP}8${NBSP}mm`);
    expect(formatLength(2.00128, 0.00766, { system: "si", locale: "de-DE" })).toBe(`2,001${NBSP}m ±${NBSP}8${NBSP}mm`);
  });

  it("in US units: 2.00128 m = 6.5659 ft (mathjs); 7.66 mm = 0.30 in and 0.025 ft, so the feet carry three decimals", () => {
    const ft = mathUnit(2.00128, "m").toNumber("ft");
    expect(ft).toBeCloseTo(6.56588, 4);
    // 7.66 mm = 0.0251 ft → two digits (leading 251) → 0.025 ft, three decimals; 0.3016 in → 0.30 in (leading 302).
    expect(formatLength(2.00128, 0.00766, { system: "us", locale: "en-US" })).toBe(`6.566${NBSP}ft ±${NBSP}0.30${NBSP}in`);
  });

  it("writes volumes in litres or US gallons and temperatures in °C or °F", () => {
    expect(formatVolume(12_483, null, { system: "si", locale: "en-GB" })).toBe(`12${NARROW}480${NBSP}L`);
    // 1000 L = 264.17 US gal (mathjs); four significant figures.
    expect(mathUnit(1000, "L").toNumber("gallon")).toBeCloseTo(264.172, 3);
    expect(formatVolume(1000, null, { system: "us", locale: "en-US" })).toBe(`264.2${NBSP}gal`);
    expect(formatVolume(5000, 40, { system: "si", locale: "en-GB" })).toBe(`5${NARROW}000${NBSP}L ±${NBSP}40${NBSP}L`);
    expect(formatTemperature(20, { system: "us", locale: "en-US" })).toBe(`68.0${NBSP}°F`);
    expect(formatTemperature(-3.25, { system: "si", locale: "de-DE" })).toBe(`\u22123,3${NBSP}°C`);
    expect(formatLength(null, 0.001, { system: "si", locale: "en-GB" })).toBe("—");
  });
});
