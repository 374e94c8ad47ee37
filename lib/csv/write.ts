// CSV out, after RFC 4180: fields with a comma, quote or line break are quoted and their quotes doubled;
// records end with CRLF. Text that a spreadsheet would run as a formula (=, +, -, @, tab, CR at the
// start) gets a leading apostrophe (OWASP "CSV Injection" advice); numbers are written as numbers.

export type CsvValue = string | number | boolean | Date | null | undefined;

const FORMULA_START = /^[=+\-@\t\r]/;

export function csvField(value: CsvValue): string {
  if (value === null || value === undefined) return "";
  if (typeof value === "number") return Number.isFinite(value) ? String(value) : "";
  if (typeof value === "boolean") return value ? "true" : "false";
  const text = value instanceof Date ? value.toISOString() : FORMULA_START.test(value) ? `'${value}` : value;
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

export function csvRecord(values: readonly CsvValue[]): string {
  return `${values.map(csvField).join(",")}\r\n`;
}

/**
 * A CSV body as a byte stream: the header, then each batch the source yields, pulled only as the client
 * reads, so a year of rows never sits in memory at once.
 */
export function csvStream(header: readonly string[], batches: AsyncIterable<readonly (readonly CsvValue[])[]>): ReadableStream<Uint8Array> {
  const encoder = new TextEncoder();
  const iterator = batches[Symbol.asyncIterator]();
  let headerSent = false;
  return new ReadableStream<Uint8Array>({
    async pull(controller) {
      if (!headerSent) {
        headerSent = true;
        controller.enqueue(encoder.encode(csvRecord(header)));
        return;
      }
      try {
        const next = await iterator.next();
        if (next.done) {
          controller.close();
          return;
        }
        controller.enqueue(encoder.encode(next.value.map(csvRecord).join("")));
      } catch (err) {
        controller.error(err);
      }
    },
    async cancel() {
      await iterator.return?.();
    },
  });
}

/** A file name safe in a Content-Disposition header. */
export function attachmentName(base: string): string {
  return `${base.replace(/[^A-Za-z0-9._-]+/g, "-").replace(/^-+|-+$/g, "") || "export"}.csv`;
}
