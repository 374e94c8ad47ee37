import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { csvRecord, csvStream, type CsvValue } from "@/lib/csv/write";
import { parseCsvText, readCsvStream } from "@/lib/csv/parse";

// What lib/csv writes, lib/csv reads back: RFC 4180 quoting of commas, quotes and line breaks [published],
// any Unicode text, and the OWASP "CSV Injection" rule [published advice]: a text field starting with
// = + - @ tab or CR comes back with the apostrophe the writer put in front of it.

const FORMULA_STARTS = ["=", "+", "-", "@", "\t", "\r"];

// Text rich in what quoting has to survive, mixed with any code point (no lone surrogates: the
// stream is UTF-8 and a lone surrogate cannot be encoded).
const awkward = fc.constantFrom(",", '"', "\n", "\r", "\r\n", '""', "'", " ", "=", "-", "@", "\t", "é", "水", "🛢️", "\u0000", "\ufeff");
const text = fc.string({ unit: fc.oneof({ weight: 1, arbitrary: awkward }, { weight: 3, arbitrary: fc.string({ unit: "binary", minLength: 1, maxLength: 1 }) }), maxLength: 12 });

const value: fc.Arbitrary<CsvValue> = fc.oneof(
  { weight: 6, arbitrary: text },
  { weight: 1, arbitrary: fc.double() },
  { weight: 1, arbitrary: fc.integer() },
  { weight: 1, arbitrary: fc.boolean() },
  { weight: 1, arbitrary: fc.date({ noInvalidDate: true, min: new Date(Date.UTC(1, 0, 1)), max: new Date(Date.UTC(9999, 11, 31)) }) },
  { weight: 1, arbitrary: fc.constantFrom(null, undefined) },
);

/** The text a reader gets back for one written value. */
function expectedText(v: CsvValue): string {
  if (v === null || v === undefined) return "";
  if (typeof v === "number") return Number.isFinite(v) ? String(v) : "";
  if (typeof v === "boolean") return String(v);
  if (v instanceof Date) return v.toISOString();
  return FORMULA_STARTS.some((c) => v.startsWith(c)) ? `'${v}` : v;
}

// A record of one empty field is written as an empty line, and an empty line is no record (RFC 4180
// leaves it open); every export has several columns, so rows here have at least two.
const rows = fc.array(fc.array(value, { minLength: 2, maxLength: 6 }), { maxLength: 15 });

// A file's first character U+FEFF is read as a byte-order mark, not as data; the writer does not
// guard a first field that starts with one. Exports always start with their fixed header, so the
// properties leave that one case out.
const startsWithBom = (v: CsvValue | undefined) => typeof v === "string" && v.startsWith("\ufeff");

const linesIn = (field: string) => (field.match(/\r\n|\r|\n/g) ?? []).length;

describe("CSV write → parse gives back the same rows", () => {
  it("as text, with each record on the file line it starts on", () => {
    fc.assert(
      fc.property(rows, (written) => {
        fc.pre(!startsWithBom(written[0]?.[0]));
        const parsed = parseCsvText(written.map(csvRecord).join(""));
        const expected = written.map((row) => row.map(expectedText));
        expect(parsed.map((r) => r.fields)).toEqual(expected);
        expect(parsed.filter((r) => r.error)).toEqual([]);
        let line = 1;
        expected.forEach((fields, i) => {
          expect(parsed[i].line).toBe(line);
          line += 1 + fields.reduce((n, f) => n + linesIn(f), 0);
        });
      }),
      { numRuns: 500 },
    );
  });

  it("as a UTF-8 byte stream cut anywhere, even inside a character, header first", async () => {
    const header = fc.array(text.filter((t) => !FORMULA_STARTS.some((c) => t.startsWith(c))), { minLength: 2, maxLength: 6 }).filter((h) => !startsWithBom(h[0]));
    const batches = fc.array(rows, { maxLength: 4 });
    await fc.assert(
      fc.asyncProperty(header, batches, fc.array(fc.nat(), { maxLength: 8 }), async (head, written, cutSeeds) => {
        async function* source() {
          yield* written;
        }
        const bytes = new Uint8Array(await new Response(csvStream(head, source())).arrayBuffer());
        const cuts = [...new Set(cutSeeds.map((c) => c % (bytes.length + 1)))].sort((a, b) => a - b);
        const pieces = [0, ...cuts].map((from, i) => bytes.slice(from, [...cuts, bytes.length][i]));
        const stream = new ReadableStream<Uint8Array>({
          start(controller) {
            pieces.forEach((p) => controller.enqueue(p));
            controller.close();
          },
        });
        const parsed = [];
        for await (const record of readCsvStream(stream, { maxBytes: bytes.length })) parsed.push(record.fields);
        expect(parsed).toEqual([head, ...written.flat().map((row) => row.map(expectedText))]);
      }),
      { numRuns: 300 },
    );
  });
});
