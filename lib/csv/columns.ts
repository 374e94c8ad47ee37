// Reading a CSV's header against the columns an import expects, and its cells as numbers and times,
// with messages a person can act on.

export interface ColumnSpec {
  required: readonly string[];
  optional: readonly string[];
}

export type HeaderResult = { ok: true; index: Record<string, number> } | { ok: false; message: string };

const OTHER_DELIMITERS: [string, string][] = [
  [";", "semicolons"],
  ["\t", "tabs"],
  ["|", "vertical bars"],
];

function normalise(name: string): string {
  return name.trim().toLowerCase();
}

/**
 * Checks the header row: every required column once, nothing unknown. A header that holds no comma but
 * another separator is named as a wrong delimiter, since that is the usual cause.
 */
export function readHeader(fields: readonly string[], spec: ColumnSpec): HeaderResult {
  const expected = [...spec.required, ...spec.optional];
  const wanted = `Expected the columns ${spec.required.join(", ")}${spec.optional.length ? ` (optional: ${spec.optional.join(", ")})` : ""}.`;
  if (fields.length === 1) {
    const only = fields[0];
    const other = OTHER_DELIMITERS.find(([d]) => only.includes(d));
    if (other) return { ok: false, message: `Line 1: the columns are separated by ${other[1]}, not commas. Save the file as comma-separated values (CSV). ${wanted}` };
  }
  const names = fields.map(normalise);
  const index: Record<string, number> = {};
  const unknown: string[] = [];
  const repeated: string[] = [];
  names.forEach((name, i) => {
    if (!expected.includes(name)) unknown.push(name === "" ? `(blank column ${i + 1})` : JSON.stringify(fields[i].trim()));
    else if (name in index) repeated.push(name);
    else index[name] = i;
  });
  const missing = spec.required.filter((name) => !(name in index));
  const problems: string[] = [];
  if (missing.length) problems.push(`missing ${missing.join(", ")}`);
  if (unknown.length) problems.push(`unknown ${unknown.join(", ")}`);
  if (repeated.length) problems.push(`repeated ${repeated.join(", ")}`);
  if (problems.length) return { ok: false, message: `Line 1: wrong columns — ${problems.join("; ")}. ${wanted}` };
  return { ok: true, index };
}

const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

export type Cell<T> = { ok: true; value: T } | { ok: false; message: string };

/** A decimal number with a point; a decimal comma or a unit in the cell is named as the problem. */
export function parseNumberCell(column: string, raw: string): Cell<number> {
  const text = raw.trim();
  if (text === "") return { ok: false, message: `${column} is empty` };
  if (NUMBER.test(text)) {
    const value = Number(text);
    if (Number.isFinite(value)) return { ok: true, value };
  }
  if (/^[+-]?\d+,\d+$/.test(text)) return { ok: false, message: `${column} "${text}" uses a decimal comma; write ${text.replace(",", ".")}` };
  return { ok: false, message: `${column} "${truncate(text)}" is not a number` };
}

/** Like parseNumberCell, but an empty cell is "not given". */
export function parseOptionalNumberCell(column: string, raw: string | undefined): Cell<number | undefined> {
  if (raw === undefined || raw.trim() === "") return { ok: true, value: undefined };
  return parseNumberCell(column, raw);
}

export function parseIntegerCell(column: string, raw: string): Cell<number> {
  const n = parseNumberCell(column, raw);
  if (!n.ok) return n;
  if (!Number.isSafeInteger(n.value)) return { ok: false, message: `${column} "${raw.trim()}" is not a whole number` };
  return n;
}

// ISO 8601 date-time with seconds optional, a fraction optional, and a zone (Z or ±hh:mm) required,
// as the device API takes it; a space may stand for the T (RFC 3339 §5.6 allows it).
const ISO_DATE_TIME = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(\.\d{1,9})?)?(Z|[+-]\d{2}:?\d{2})$/i;

/** A timestamp with its zone; a date without one is refused, since a site's local time is ambiguous at the clock change. */
export function parseTimestampCell(column: string, raw: string): Cell<Date> {
  const text = raw.trim();
  if (text === "") return { ok: false, message: `${column} is empty` };
  const m = ISO_DATE_TIME.exec(text);
  if (!m) {
    const hint = /^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}(:\d{2}(\.\d+)?)?$/.test(text) ? " has no time zone; add Z for UTC or an offset like +01:00" : " is not a date-time like 2026-03-14T06:30:00Z";
    return { ok: false, message: `${column} "${truncate(text)}"${hint}` };
  }
  const [, y, mo, d, h, mi, s, fraction, zone] = m;
  const month = Number(mo);
  const day = Number(d);
  const daysInMonth = new Date(Date.UTC(Number(y), month, 0)).getUTCDate();
  if (month < 1 || month > 12 || day < 1 || day > daysInMonth || Number(h) > 23 || Number(mi) > 59 || Number(s ?? 0) > 59) {
    return { ok: false, message: `${column} "${text}" is not a real date and time` };
  }
  const offset = zone.toUpperCase() === "Z" ? "Z" : `${zone.slice(0, 3)}:${zone.slice(-2)}`;
  const at = new Date(`${y}-${mo}-${d}T${h}:${mi}:${s ?? "00"}${fraction ?? ""}${offset}`);
  if (Number.isNaN(at.getTime())) return { ok: false, message: `${column} "${text}" is not a real date and time` };
  return { ok: true, value: at };
}

function truncate(text: string): string {
  return text.length > 40 ? `${text.slice(0, 40)}…` : text;
}
