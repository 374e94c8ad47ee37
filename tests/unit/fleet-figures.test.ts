import { describe, expect, it } from "vitest";
import {
  ageWhenOverdue,
  formatAge,
  formatDaysToReorder,
  formatDuration,
  formatLitres,
  formatMetres,
  formatPercent,
  groupDigits,
  isOverdue,
  roundUncertainty,
} from "@/components/fleet/fleet-figures";

const NBSP = "\u00a0";
const NARROW = "\u202f";

describe("roundUncertainty", () => {
  // Particle Data Group, Review of Particle Physics, Introduction, "Rounding" (from memory):
  // 0.827 ± 0.119 is written 0.83 ± 0.12, and 0.827 ± 0.367 is written 0.8 ± 0.4; leading digits
  // 950–999 round up to 1000 and keep two significant digits.
  it("keeps two significant digits when the leading three lie in 100–354", () => {
    expect(roundUncertainty(0.119)).toEqual({ value: 0.12, decimals: 2 });
    expect(roundUncertainty(0.354)).toEqual({ value: 0.35, decimals: 2 });
  });
  it("keeps one significant digit when they lie in 355–949", () => {
    expect(roundUncertainty(0.367)).toEqual({ value: 0.4, decimals: 1 });
    expect(roundUncertainty(0.0062)).toEqual({ value: 0.006, decimals: 3 });
  });
  it("rounds 950–999 up to the next power of ten with two significant digits", () => {
    expect(roundUncertainty(0.98)).toEqual({ value: 1, decimals: 1 });
    expect(roundUncertainty(0.00097)).toEqual({ value: 0.001, decimals: 4 });
  });
  it("rounds large uncertainties to tens and hundreds", () => {
    expect(roundUncertainty(367)).toEqual({ value: 400, decimals: -2 });
    expect(roundUncertainty(119)).toEqual({ value: 120, decimals: -1 });
  });
  it("refuses a zero or negative uncertainty", () => {
    expect(() => roundUncertainty(0)).toThrow(RangeError);
    expect(() => roundUncertainty(-1)).toThrow(RangeError);
  });
});

describe("formatMetres", () => {
  it("writes the value to the decimal place of its rounded uncertainty (LOOK.md's example)", () => {
    // LOOK.md: level "1.842 m ± 6 mm"; 6.2 mm rounds to 6 mm by the PDG rule above.
    expect(formatMetres(1.84237, 0.0062)).toBe(`1.842${NBSP}m ±${NBSP}6${NBSP}mm`);
  });
  it("keeps a second digit of the uncertainty in the 100–354 band", () => {
    // PDG rule: 1.23 mm → 1.2 mm, so the value carries 0.1 mm.
    expect(formatMetres(1.84237, 0.00123)).toBe(`1.8424${NBSP}m ±${NBSP}1.2${NBSP}mm`);
  });
  it("never writes a length coarser than a centimetre", () => {
    expect(formatMetres(1.84237, 0.6)).toBe(`1.84${NBSP}m ±${NBSP}600${NBSP}mm`);
  });
  it("writes a millimetre without an uncertainty, and a dash for no value", () => {
    expect(formatMetres(0.5)).toBe(`0.500${NBSP}m`);
    expect(formatMetres(null)).toBe("—");
  });
});

describe("grouping and units", () => {
  // BIPM, The International System of Units, 9th ed. (2019), §5.4.3–5.4.4 [published]: a space between
  // the number and the unit (also for %), digits grouped in threes with a thin space.
  it("groups thousands with a narrow no-break space", () => {
    expect(groupDigits("12480")).toBe(`12${NARROW}480`);
    expect(groupDigits("1234567.25")).toBe(`1${NARROW}234${NARROW}567.25`);
    expect(groupDigits("-3000")).toBe(`\u22123${NARROW}000`);
  });
  it("writes a volume to four significant figures and not finer than a litre", () => {
    // LOOK.md: "12 480 L".
    expect(formatLitres(12483.4)).toBe(`12${NARROW}480${NBSP}L`);
    expect(formatLitres(843.6)).toBe(`844${NBSP}L`);
    expect(formatLitres(3000)).toBe(`3${NARROW}000${NBSP}L`);
    expect(formatLitres(0)).toBe(`0${NBSP}L`);
  });
  it("writes a fill as a whole percentage with a space before the sign", () => {
    // LOOK.md: "63 %".
    expect(formatPercent(63.4)).toBe(`63${NBSP}%`);
    expect(formatPercent(undefined)).toBe("—");
  });
});

describe("ages", () => {
  const now = new Date("2026-03-14T12:00:00Z");
  it("says how long ago in minutes, hours and days", () => {
    // LOOK.md: "14 min ago".
    expect(formatAge(new Date("2026-03-14T11:46:00Z"), now)).toBe("14 min ago");
    expect(formatAge(new Date("2026-03-14T09:00:00Z"), now)).toBe("3 h ago");
    expect(formatAge(new Date("2026-03-11T12:00:00Z"), now)).toBe("3 d ago");
    expect(formatAge(new Date("2026-03-14T11:59:40Z"), now)).toBe("just now");
  });
  it("shows the age only after two expected intervals (LOOK.md's rule)", () => {
    expect(isOverdue(new Date("2026-03-14T11:58:00Z"), 60, now)).toBe(false);
    expect(isOverdue(new Date("2026-03-14T11:57:59Z"), 60, now)).toBe(true);
    expect(ageWhenOverdue(new Date("2026-03-14T11:59:00Z"), 60, now)).toBeNull();
    expect(ageWhenOverdue(new Date("2026-03-14T11:46:00Z"), 300, now)).toBe("14 min ago");
    expect(ageWhenOverdue(null, 60, now)).toBe("no value yet");
  });
  it("writes a time in state in the two largest units", () => {
    expect(formatDuration(45 * 60)).toBe("45 min");
    expect(formatDuration(2 * 3600 + 14 * 60)).toBe("2 h 14 min");
    expect(formatDuration(3 * 86400 + 4 * 3600 + 59)).toBe("3 d 4 h");
    expect(formatDuration(20)).toBe("under a minute");
  });
  it("says when to reorder", () => {
    expect(formatDaysToReorder(0)).toBe("reorder now");
    expect(formatDaysToReorder(0.4)).toBe("within a day");
    expect(formatDaysToReorder(1.7)).toBe("in 1 day");
    expect(formatDaysToReorder(12.2)).toBe("in 12 days");
    expect(formatDaysToReorder(null)).toBe("no fall in level");
  });
});
