import { describe, expect, it } from "vitest";
import {
  formatDaysToReorder,
  formatDuration,
  formatLitres,
  formatMetres,
  formatPercent,
  isOverdue,
} from "@/components/fleet/fleet-figures";

const NBSP = "\u00a0";
const NARROW = "\u202f";

describe("formatMetres", () => {
  // The stored uncertainty is the standard one (k = 1); screens quote U = 2u (GUM, JCGM 100:2008, §6.2–6.3)
  // to one or two significant digits (§7.2.6) with the Particle Data Group's 354 rule (from memory):
  // leading digits 100–354 keep two, 355–949 one. Expected texts worked out by hand.
  it("quotes U = 2u with k and writes the value to U's decimal place", () => {
    // u = 6.2 mm → U = 12.4 mm → leading 124: two digits, 12 mm → the value to the millimetre.
    expect(formatMetres(1.84237, 0.0062)).toBe(`1.842${NBSP}m ±${NBSP}12${NBSP}mm${NBSP}(k=2)`);
    // u = 3.1 mm → U = 6.2 mm → leading 620: one digit, 6 mm (LOOK.md's "1.842 m ± 6 mm").
    expect(formatMetres(1.84237, 0.0031)).toBe(`1.842${NBSP}m ±${NBSP}6${NBSP}mm${NBSP}(k=2)`);
  });
  it("drops digits a coarse uncertainty does not support", () => {
    // u = 0.3 m → U = 0.6 m: one digit, the value to a tenth of a metre.
    expect(formatMetres(1.84237, 0.3)).toBe(`1.8${NBSP}m ±${NBSP}600${NBSP}mm${NBSP}(k=2)`);
  });
  it("writes a millimetre without an uncertainty, and a dash for no value", () => {
    expect(formatMetres(0.5)).toBe(`0.500${NBSP}m`);
    expect(formatMetres(null)).toBe("—");
  });
});

describe("grouping and units", () => {
  // BIPM, The International System of Units, 9th ed. (2019), §5.4.3–5.4.4 [published]: a space between
  // the number and the unit (also for %), digits grouped in threes with a thin space.
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
  it("shows the age only after two expected intervals (LOOK.md's rule)", () => {
    expect(isOverdue(new Date("2026-03-14T11:58:00Z"), 60, now)).toBe(false);
    expect(isOverdue(new Date("2026-03-14T11:57:59Z"), 60, now)).toBe(true);
    expect(isOverdue(null, 60, now)).toBe(true);
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
