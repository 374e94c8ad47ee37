import { describe, expect, it } from "vitest";
import { unit as mathUnit } from "mathjs";
import { figuresFor } from "@/lib/format/figures";
import { figureOptionsOf, hourCycleOf, numberLocaleOf, resolveDisplaySettings, type DisplaySettings } from "@/lib/format/display";
import { quantityInputFor } from "@/lib/units/quantity-input";
import { exportUnitsFor } from "@/lib/format/export-units";

const NBSP = "\u00a0";
const NARROW = "\u202f";

const SI: DisplaySettings = { unit_system: "si", decimal_separator: ".", clock: "24h" };
const US: DisplaySettings = { unit_system: "us", decimal_separator: ".", clock: "12h" };
const si = figuresFor(figureOptionsOf(SI));
const us = figuresFor(figureOptionsOf(US));
const comma = figuresFor(figureOptionsOf({ ...SI, decimal_separator: "," }));

describe("lengths (SI)", () => {
  // The stored uncertainty is the standard one (k = 1); screens quote U = 2u (GUM, JCGM 100:2008, §6.2–6.3)
  // to one or two significant digits (§7.2.6) with the Particle Data Group's 354 rule (from memory):
  // leading digits 100–354 keep two, 355–949 one. Expected texts worked out by hand.
  it("quotes U = 2u with k and writes the value to U's decimal place", () => {
    // u = 6.2 mm → U = 12.4 mm → leading 124: two digits, 12 mm → the value to the millimetre.
    expect(si.length(1.84237, 0.0062)).toBe(`1.842${NBSP}m ±${NBSP}12${NBSP}mm${NBSP}(k=2)`);
    // u = 3.1 mm → U = 6.2 mm → leading 620: one digit, 6 mm (LOOK.md's "1.842 m ± 6 mm").
    expect(si.length(1.84237, 0.0031)).toBe(`1.842${NBSP}m ±${NBSP}6${NBSP}mm${NBSP}(k=2)`);
  });
  it("drops digits a coarse uncertainty does not support", () => {
    // u = 0.3 m → U = 0.6 m: one digit, the value to a tenth of a metre.
    expect(si.length(1.84237, 0.3)).toBe(`1.8${NBSP}m ±${NBSP}600${NBSP}mm${NBSP}(k=2)`);
  });
  it("writes a millimetre without an uncertainty, and a dash for no value", () => {
    expect(si.length(0.5)).toBe(`0.500${NBSP}m`);
    expect(si.length(null)).toBe("—");
  });
});

describe("grouping and units", () => {
  // BIPM, The International System of Units, 9th ed. (2019), §5.4.3–5.4.4 [published]: a space between
  // the number and the unit (also for %), digits grouped in threes with a thin space.
  it("writes a volume to four significant figures and not finer than a litre", () => {
    // LOOK.md: "12 480 L".
    expect(si.volume(12483.4)).toBe(`12${NARROW}480${NBSP}L`);
    expect(si.volume(843.6)).toBe(`844${NBSP}L`);
    expect(si.volume(3000)).toBe(`3${NARROW}000${NBSP}L`);
    expect(si.volume(0)).toBe(`0${NBSP}L`);
  });
  it("writes a fill as a whole percentage with a space before the sign", () => {
    // LOOK.md: "63 %".
    expect(si.percent(63.4)).toBe(`63${NBSP}%`);
    expect(si.percent(undefined)).toBe("—");
  });
});

describe("lengths, volumes and temperatures in US customary units", () => {
  // 1 ft = 0.3048 m, 1 in = 25.4 mm exactly (NIST SP 811, Appendix B); mathjs gives the same factors.
  it("converts the value and its uncertainty, then rounds both to what U supports", () => {
    // u = 6.2 mm → U = 12.4 mm = 0.0407 ft (leading 407: one digit, 0.04 ft → the value to 0.01 ft) and
    // 0.488 in (leading 488: one digit, 0.5 in); 1.84237 m = 6.0445 ft (computed, mathjs below).
    expect(mathUnit(1.84237, "m").toNumber("ft")).toBeCloseTo(6.0445, 4);
    expect(mathUnit(12.4, "mm").toNumber("inch")).toBeCloseTo(0.488, 3);
    expect(us.length(1.84237, 0.0062)).toBe(`6.04${NBSP}ft ±${NBSP}0.5${NBSP}in${NBSP}(k=2)`);
    // Without an uncertainty: to 0.01 ft (3 mm). 2.5 m = 8.2021 ft (mathjs).
    expect(mathUnit(2.5, "m").toNumber("ft")).toBeCloseTo(8.2021, 4);
    expect(us.length(2.5)).toBe(`8.20${NBSP}ft`);
  });
  it("writes volumes in US gallons to four significant figures", () => {
    // 1 US gal = 231 in³ = 3.785 411 784 L (NIST Handbook 44, Appendix C): 1 000 L = 264.17 gal (mathjs).
    expect(mathUnit(1000, "L").toNumber("gallon")).toBeCloseTo(264.172, 3);
    expect(us.volume(1000)).toBe(`264.2${NBSP}gal`);
    // 12 483.4 L = 3 297.7 gal → four significant figures: 3 298 gal.
    expect(mathUnit(12483.4, "L").toNumber("gallon")).toBeCloseTo(3297.75, 1);
    expect(us.volume(12483.4)).toBe(`3${NARROW}298${NBSP}gal`);
  });
  it("writes air temperatures in °F", () => {
    // T(°F) = T(°C)·9/5 + 32 (NIST SP 811, §4.2.1.1): 20 °C = 68 °F, −40 °C = −40 °F.
    expect(us.temperature(20)).toBe(`68.0${NBSP}°F`);
    expect(us.temperature(-40)).toBe(`\u221240.0${NBSP}°F`);
    expect(us.levelSymbol).toBe("ft");
    expect(us.levelFromSi(0.3048)).toBeCloseTo(1, 12);
  });
});

describe("decimal separator and clock", () => {
  it("writes a decimal comma and keeps thin-space grouping", () => {
    expect(comma.length(1.84237, 0.0062)).toBe(`1,842${NBSP}m ±${NBSP}12${NBSP}mm${NBSP}(k=2)`);
    expect(comma.volume(12483.4)).toBe(`12${NARROW}480${NBSP}L`);
    expect(comma.temperature(18.25)).toBe(`18,3${NBSP}°C`);
    expect(numberLocaleOf(",")).not.toBe(numberLocaleOf("."));
  });
  it("maps the clock to an hour cycle", () => {
    expect(hourCycleOf("12h")).toBe("h12");
    expect(hourCycleOf("24h")).toBe("h23");
  });
  it("takes each of a user's own settings over the organisation's, null following the organisation", () => {
    expect(resolveDisplaySettings(SI, { unit_system: "us", decimal_separator: null })).toEqual({ unit_system: "us", decimal_separator: ".", clock: "24h" });
    expect(resolveDisplaySettings(US, {})).toEqual(US);
  });
});

describe("number boxes in the person's units", () => {
  it("shows a stored SI value in the person's unit and reads an untouched box back exactly", () => {
    const qi = quantityInputFor(US);
    // 3 m = 9.8425 ft (mathjs); shown to 0.0001 ft, read back as exactly 3 m, not 2.99999 m.
    const text = qi.text(3, "length");
    expect(text).toBe("9.8425");
    expect(mathUnit(3, "m").toNumber("ft")).toBeCloseTo(9.8425, 4);
    expect(qi.read(text, "length")).toBe(3);
    expect(qi.symbolOf("length")).toBe("ft");
  });
  it("reads feet and inches, a bare number in the box's unit, and another unit typed", () => {
    const qi = quantityInputFor(US);
    // 8 ft 3.5 in = 2.5273 m (1 in = 25.4 mm exactly, mathjs below).
    expect(qi.read("8 ft 3.5 in", "length")).toBeCloseTo(mathUnit(8, "ft").toNumber("m") + mathUnit(3.5, "inch").toNumber("m"), 12);
    expect(qi.read("10", "length")).toBeCloseTo(mathUnit(10, "ft").toNumber("m"), 12);
    expect(qi.read("2.5 m", "length")).toBe(2.5);
    expect(qi.read("300", "volume")).toBeCloseTo(mathUnit(300, "gallon").toNumber("L"), 9);
    expect(qi.read("68", "temperature")).toBeCloseTo(20, 12);
    expect(qi.read("", "length")).toBeNull();
    expect(qi.read("ten", "length")).toBeNaN();
    expect(qi.problem("ten", "length")).toMatch(/number/);
  });
  it("reads a decimal comma where the person writes one", () => {
    const qi = quantityInputFor({ ...SI, decimal_separator: "," });
    expect(qi.text(2.45, "length")).toBe("2,45");
    expect(qi.read("2,45", "length")).toBe(2.45);
    expect(qi.read("1,5 m", "length")).toBe(1.5);
  });
  it("reads a lone separator as the decimal sign whatever the setting (as components/ui/decimal.ts does)", () => {
    const point = quantityInputFor(SI);
    expect(point.read("2,1", "length")).toBe(2.1);
    expect(point.read("1,234", "length")).toBe(1.234);
    expect(point.read("1 500.5", "volume")).toBe(1500.5);
    const comma = quantityInputFor({ ...SI, decimal_separator: "," });
    expect(comma.read("2.1", "length")).toBe(2.1);
    expect(comma.read("1.500,5", "volume")).toBe(1500.5);
  });
});

describe("export columns", () => {
  it("name their unit: SI as before, US customary in ft, in, gal and °F", () => {
    const si = exportUnitsFor("si");
    const us = exportUnitsFor("us");
    expect(["level_m", "uncertainty_m", "volume_l", "air_temp_c", "speed_of_sound_ms", "fill_pct"].map(si.column)).toEqual(["level_m", "uncertainty_m", "volume_l", "air_temp_c", "speed_of_sound_ms", "fill_pct"]);
    expect(["level_m", "uncertainty_m", "volume_l", "air_temp_c", "speed_of_sound_ms", "fill_pct"].map(us.column)).toEqual(["level_ft", "uncertainty_in", "volume_gal", "air_temp_f", "speed_of_sound_ms", "fill_pct"]);
    // 1 in = 25.4 mm, 1 US gal = 231 in³ (NIST SP 811 Appendix B, Handbook 44 Appendix C); mathjs agrees.
    expect(us.fine(0.0254)).toBeCloseTo(1, 12);
    expect(us.litres(1000)).toBeCloseTo(mathUnit(1000, "L").toNumber("gallon"), 9);
    expect(us.celsius(100)).toBeCloseTo(212, 12);
    expect(si.length(null)).toBeNull();
  });
});
