// Reading what a person typed in their own locale and units: "2,45 m", "8 ft 3.5 in" or 8' 3.5",
// "1 500 L", "300 gal", "68 °F". The result is SI, as the APIs store it. A bare number is in the unit
// the field shows.

import { quantityOf, toSi, UNIT_SYMBOLS, type Quantity, type Unit } from "./units";

export interface LocaleSeparators {
  decimal: string;
  group: string;
}

const separatorCache = new Map<string, LocaleSeparators>();

/** The decimal and group separators of a locale, as Intl writes 12345.5. */
export function separatorsOf(locale: string): LocaleSeparators {
  let s = separatorCache.get(locale);
  if (!s) {
    const parts = new Intl.NumberFormat(locale).formatToParts(12345.5);
    s = { decimal: parts.find((p) => p.type === "decimal")?.value ?? ".", group: parts.find((p) => p.type === "group")?.value ?? "," };
    separatorCache.set(locale, s);
  }
  return s;
}

const SPACE = /[\s\u00a0\u202f\u2009]/;
const SPACES = new RegExp(SPACE.source, "g");

function escapeRegExp(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");
}

/**
 * A number written in a locale: its decimal separator; digits grouped by spaces or by the locale's
 * group separator, only in whole groups of three ("1,5" in English is not 15). The minus sign may be
 * U+2212. Null when it is not such a number.
 */
export function parseLocaleNumber(text: string, locale: string): number | null {
  const { decimal, group } = separatorsOf(locale);
  let t = text.trim().replace(/\u2212/g, "-");
  const negative = t.startsWith("-");
  if (negative || t.startsWith("+")) t = t.slice(1).trim();
  const groupChar = SPACE.test(group) ? " " : group;
  t = t.replace(SPACES, " ");
  const g = escapeRegExp(groupChar);
  const d = escapeRegExp(decimal);
  const grouped = new RegExp(`^(\\d{1,3}((${g}| )\\d{3})+|\\d+)(${d}\\d+)?$`);
  if (!grouped.test(t)) {
    // A bare decimal part such as ",5" or ".5".
    if (!new RegExp(`^${d}\\d+$`).test(t)) return null;
  }
  const normal = t.split(decimal).map((part) => part.replace(new RegExp(`${g}| `, "g"), "")).join(".");
  const value = Number(normal);
  return Number.isFinite(value) ? (negative ? -value : value) : null;
}

const UNIT_WORDS: Record<string, Unit> = {
  m: "m",
  metre: "m",
  metres: "m",
  meter: "m",
  meters: "m",
  cm: "cm",
  mm: "mm",
  ft: "ft",
  foot: "ft",
  feet: "ft",
  "'": "ft",
  "′": "ft",
  in: "in",
  inch: "in",
  inches: "in",
  '"': "in",
  "″": "in",
  l: "L",
  litre: "L",
  litres: "L",
  liter: "L",
  liters: "L",
  "m3": "m3",
  "m³": "m3",
  gal: "gal",
  gallon: "gal",
  gallons: "gal",
  "°c": "degC",
  c: "degC",
  "°f": "degF",
  f: "degF",
};

export type ParsedQuantity = { ok: true; valueSi: number; unit: Unit } | { ok: false; message: string };

export interface ParseOptions {
  quantity: Quantity;
  locale: string;
  /** The unit the field shows; a bare number is in it. */
  unit: Unit;
}

// A number then an optional unit word; repeated for feet and inches.
const TERM = /([+\-\u2212]?[\d\s\u00a0\u202f\u2009.,]*\d)\s*(°\s*[cCfF]|m³|m3|[a-zA-Z]+|['′"″])?/gy;

/** What a person typed in a field of `unit`, in SI; feet and inches may be combined ("8 ft 3.5 in"). */
export function parseQuantity(text: string, { quantity, locale, unit }: ParseOptions): ParsedQuantity {
  const input = text.trim();
  if (input === "") return { ok: false, message: "Enter a value." };
  const terms: { value: number; unit: Unit }[] = [];
  TERM.lastIndex = 0;
  let pos = 0;
  while (pos < input.length) {
    TERM.lastIndex = pos;
    const m = TERM.exec(input);
    if (!m) return { ok: false, message: `Write a number${unitHint(unit)}.` };
    const value = parseLocaleNumber(m[1], locale);
    if (value === null) return { ok: false, message: `"${m[1].trim()}" is not a number in this locale (decimal separator "${separatorsOf(locale).decimal}").` };
    const word = m[2]?.replace(/\s/g, "").toLowerCase();
    const termUnit = word === undefined ? unit : UNIT_WORDS[word];
    if (termUnit === undefined) return { ok: false, message: `"${m[2]}" is not a unit this field understands${unitHint(unit)}.` };
    if (quantityOf(termUnit) !== quantity) return { ok: false, message: `${UNIT_SYMBOLS[termUnit]} is not a ${quantity}.` };
    terms.push({ value, unit: termUnit });
    pos = TERM.lastIndex;
    while (pos < input.length && /\s/.test(input[pos])) pos++;
  }
  if (terms.length === 1) return { ok: true, valueSi: toSi(terms[0].value, terms[0].unit), unit: terms[0].unit };
  const feetInches = terms.length === 2 && terms[0].unit === "ft" && terms[1].unit === "in" && terms[0].value >= 0 && terms[1].value >= 0 && terms[1].value < 12;
  if (!feetInches) return { ok: false, message: "Write one value, or feet and inches (8 ft 3.5 in)." };
  return { ok: true, valueSi: toSi(terms[0].value, "ft") + toSi(terms[1].value, "in"), unit: "ft" };
}

function unitHint(unit: Unit): string {
  return ` in ${UNIT_SYMBOLS[unit]}`;
}
