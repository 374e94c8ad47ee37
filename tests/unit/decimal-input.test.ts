import { describe, expect, it } from "vitest";
import { numberOrNull, parseDecimal } from "@/components/ui/decimal";

// Checked against what the platform's own number formatting writes (Intl.NumberFormat, ECMA-402) in
// locales with a decimal point, a decimal comma and space grouping: what a person copies or types as
// their locale writes it must read back as the same number.
describe("parseDecimal", () => {
  const samples = [2.1, 0.05, 1234.5, 1234567.25, -3.75];
  for (const locale of ["en-GB", "en-US", "de-DE", "fr-FR", "nl-NL", "sv-SE"]) {
    it(`reads numbers as ${locale} writes them (Intl.NumberFormat)`, () => {
      const format = new Intl.NumberFormat(locale, { maximumFractionDigits: 3 });
      for (const n of samples) expect(parseDecimal(format.format(n))).toBe(n);
    });
  }

  it("reads a lone comma as the decimal separator: '2,1' is 2.1, never 21 (issue 12)", () => {
    expect(parseDecimal("2,1")).toBe(2.1);
    expect(parseDecimal("2.1")).toBe(2.1);
    expect(parseDecimal(" 0,75 ")).toBe(0.75);
  });

  it("refuses what cannot be read one way only", () => {
    for (const text of ["2,1,5", "1.2,3.4", "12,34,56", "abc", "2..1", "1e3", ""]) expect(parseDecimal(text)).toBeNaN();
  });

  it("leaves an empty box as not given", () => {
    expect(numberOrNull("  ")).toBeNull();
    expect(numberOrNull("2,5")).toBe(2.5);
  });
});
