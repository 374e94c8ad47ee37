// Numbers typed by people: "2,1" and "2.1" are both two point one, whatever the browser's locale, and a
// thousands separator is accepted only where it cannot be read as the decimal one.

/**
 * Reads a typed decimal number. Spaces (also no-break and narrow no-break) group digits; with both "," and
 * "." the last one is the decimal separator; a lone "," or "." is always the decimal separator (so "2,1"
 * is 2.1, never 21, and "1,234" is 1.234: thousands are typed without a separator or with a space); a
 * separator that repeats without the other is a grouping ("1.234.567"). Anything else is NaN, for the
 * schema to refuse.
 */
export function parseDecimal(text: string): number {
  const t = text.trim().replace(/[\s\u00a0\u202f]/g, "").replace(/^\u2212/, "-");
  if (!/^[-+]?[\d.,]*\d[\d.,]*$/.test(t)) return Number.NaN;
  const commas = (t.match(/,/g) ?? []).length;
  const dots = (t.match(/\./g) ?? []).length;
  let normal: string;
  if (commas && dots) {
    const decimal = t.lastIndexOf(",") > t.lastIndexOf(".") ? "," : ".";
    const group = decimal === "," ? "." : ",";
    if ((decimal === "," ? commas : dots) > 1) return Number.NaN;
    normal = t.split(group).join("").replace(decimal, ".");
  } else if (commas + dots === 1) {
    normal = t.replace(",", ".");
  } else if (commas > 1 || dots > 1) {
    const sep = commas ? "," : ".";
    const groups = t.replace(/^[-+]/, "").split(sep);
    if (groups.slice(1).some((g) => g.length !== 3) || groups[0].length > 3 || !groups[0].length) return Number.NaN;
    normal = t.split(sep).join("");
  } else {
    normal = t;
  }
  return Number(normal);
}

/** An empty box is "not given" (null); anything else is read as a decimal number (NaN fails the schema). */
export function numberOrNull(text: string | undefined): number | null {
  return text == null || text.trim() === "" ? null : parseDecimal(text);
}
