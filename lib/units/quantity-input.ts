// A number box for a quantity shows its value in the person's unit and decimal sign and reads back what
// they typed (parse.ts) as SI for the API. A value shown and left untouched reads back exactly as it was
// stored: 3 m shows as "9.8425 ft", which would otherwise save as 2.99999 m.

import { formatNumber } from "../format/number";
import { figureOptionsOf, numberLocaleOf, type DisplaySettings } from "../format/display";
import { parseQuantity } from "./parse";
import { DISPLAY_UNITS, fromSi, UNIT_SYMBOLS, type Quantity, type Unit } from "./units";

/** Decimals a box shows: finer than anyone reads a level (0.1 mm, 0.001 in, 0.01 gal, 0.01 °F). */
const FIELD_DECIMALS: Record<Unit, number> = { m: 4, cm: 2, mm: 1, ft: 4, in: 3, L: 1, m3: 4, gal: 2, degC: 2, degF: 2 };

export interface QuantityInput {
  /** The unit a bare number in a box of this quantity is in. */
  unitOf(quantity: Quantity, fine?: boolean): Unit;
  symbolOf(quantity: Quantity, fine?: boolean): string;
  /** An SI value as the box shows it, without grouping: "9.8425", "9,8425". */
  text(si: number | null | undefined, quantity: Quantity, fine?: boolean): string;
  /** What the box holds, in SI: null when empty, NaN (for the schema to refuse) when it is not a quantity. */
  read(text: string | undefined, quantity: Quantity, fine?: boolean): number | null;
  /** Why `read` gave NaN, for the field's message. */
  problem(text: string | undefined, quantity: Quantity, fine?: boolean): string | null;
}

export function quantityInputFor(settings: DisplaySettings): QuantityInput {
  const { locale, system } = figureOptionsOf(settings);
  const units = DISPLAY_UNITS[system];
  const unitOf = (q: Quantity, fine = false): Unit => (q === "length" ? (fine ? units.fineLength : units.level) : q === "volume" ? units.volume : units.temperature);
  // Texts this box wrote, with the exact value each stands for.
  const shown = new Map<string, number>();
  const key = (text: string, q: Quantity, fine: boolean) => `${q}|${fine}|${text.trim()}`;
  // A lone "," or "." is the decimal sign whatever the setting (as components/ui/decimal.ts reads plain
  // numbers): "2,1" typed on a borrowed keyboard is 2.1, never 21; with both signs the setting decides.
  const parse = (text: string, q: Quantity, fine: boolean) => {
    const lone = /^[^.,]*[.,][^.,]*$/.test(text) ? (text.includes(",") ? "," : ".") : null;
    return parseQuantity(text, { quantity: q, locale: lone ? numberLocaleOf(lone) : locale, unit: unitOf(q, fine) });
  };
  return {
    unitOf,
    symbolOf: (q, fine) => UNIT_SYMBOLS[unitOf(q, fine)],
    text(si, q, fine = false) {
      if (si == null || !Number.isFinite(si)) return "";
      const unit = unitOf(q, fine);
      const t = formatNumber(fromSi(si, unit), FIELD_DECIMALS[unit], locale)
        .replace(/\u202f/g, "")
        .replace(/([.,]\d*?)0+$/, "$1")
        .replace(/[.,]$/, "");
      shown.set(key(t, q, fine), si);
      return t;
    },
    read(text, q, fine = false) {
      if (text == null || text.trim() === "") return null;
      const exact = shown.get(key(text, q, fine));
      if (exact !== undefined) return exact;
      const r = parse(text, q, fine);
      return r.ok ? r.valueSi : Number.NaN;
    },
    problem(text, q, fine = false) {
      if (text == null || text.trim() === "") return null;
      const r = parse(text, q, fine);
      return r.ok ? null : r.message;
    },
  };
}
