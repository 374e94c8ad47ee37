// A streaming CSV reader after RFC 4180: comma-separated fields, fields in double quotes may hold
// commas, line breaks and doubled quotes (""), records end with CRLF or LF. Text arrives in chunks of
// any size; each complete record comes out with the file line it started on, so errors can name it.

export interface CsvRecord {
  /** 1-based line of the file where the record starts. */
  line: number;
  fields: string[];
  /** Set when the record is malformed (a quote in an unquoted field, text after a closing quote, an unclosed quote). */
  error?: string;
}

type State = "field_start" | "unquoted" | "quoted" | "quote_in_quoted";

/** Incremental parser: `push` each chunk of text, then `end` once; both return the records completed. */
export class CsvParser {
  private state: State = "field_start";
  private field = "";
  private fields: string[] = [];
  private line = 1;
  private recordLine = 1;
  private error: string | undefined;
  private lastWasCr = false;
  private crInQuoted = false;
  private started = false;

  push(chunk: string): CsvRecord[] {
    const out: CsvRecord[] = [];
    let text = chunk;
    if (!this.started && text.length > 0) {
      this.started = true;
      // A byte-order mark is not part of the first column's name.
      if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
    }
    for (let i = 0; i < text.length; i++) {
      const ch = text[i];
      // CRLF counts as one line break; the LF after a CR that ended a record is skipped.
      if (this.lastWasCr) {
        this.lastWasCr = false;
        if (ch === "\n") continue;
      }
      switch (this.state) {
        case "field_start":
          if (ch === '"') this.state = "quoted";
          else if (ch === ",") this.endField();
          else if (ch === "\n" || ch === "\r") this.endRecord(out, ch);
          else {
            this.field += ch;
            this.state = "unquoted";
          }
          break;
        case "unquoted":
          if (ch === ",") this.endField();
          else if (ch === "\n" || ch === "\r") this.endRecord(out, ch);
          else {
            if (ch === '"') this.error ??= "a quote inside an unquoted field; put the whole field in quotes and double the quote";
            this.field += ch;
          }
          break;
        case "quoted":
          if (ch === '"') this.state = "quote_in_quoted";
          else {
            // A line break inside quotes still moves the file's line on (CRLF once).
            if (ch === "\r" || (ch === "\n" && !this.crInQuoted)) this.line += 1;
            this.field += ch;
          }
          this.crInQuoted = ch === "\r";
          break;
        case "quote_in_quoted":
          if (ch === '"') {
            this.field += '"';
            this.state = "quoted";
          } else if (ch === ",") this.endField();
          else if (ch === "\n" || ch === "\r") this.endRecord(out, ch);
          else {
            this.error ??= "text after a closing quote; double a quote inside a quoted field";
            this.field += ch;
            this.state = "unquoted";
          }
          break;
      }
    }
    return out;
  }

  end(): CsvRecord[] {
    const out: CsvRecord[] = [];
    if (this.state === "quoted") {
      this.error ??= "a quoted field is never closed";
      this.fields.push(this.field);
      out.push(this.take());
    } else if (this.state !== "field_start" || this.fields.length > 0) {
      this.fields.push(this.field);
      out.push(this.take());
    }
    return out;
  }

  private endField() {
    this.fields.push(this.field);
    this.field = "";
    this.state = "field_start";
  }

  private endRecord(out: CsvRecord[], ch: string) {
    this.fields.push(this.field);
    const record = this.take();
    // A blank line is not a record.
    if (!(record.fields.length === 1 && record.fields[0] === "" && !record.error)) out.push(record);
    this.line += 1;
    this.recordLine = this.line;
    if (ch === "\r") this.lastWasCr = true;
  }

  private take(): CsvRecord {
    const record: CsvRecord = { line: this.recordLine, fields: this.fields };
    if (this.error) record.error = this.error;
    this.fields = [];
    this.field = "";
    this.error = undefined;
    this.state = "field_start";
    return record;
  }
}

/** The whole of a text at once (tests, small inputs). */
export function parseCsvText(text: string): CsvRecord[] {
  const parser = new CsvParser();
  return [...parser.push(text), ...parser.end()];
}

export class CsvStreamError extends Error {
  constructor(
    readonly code: "too_large" | "not_text",
    message: string,
  ) {
    super(message);
  }
}

export interface StreamOptions {
  /** Stop with CsvStreamError("too_large") as soon as more bytes than this have arrived. */
  maxBytes: number;
  /** Called with the bytes read so far after each chunk. */
  onBytes?: (bytes: number) => void;
}

/**
 * Records from a byte stream as they complete, decoding UTF-8 strictly: a file in another encoding
 * stops with a clear error instead of importing garbled names. The size limit is enforced while
 * reading, so an oversized upload is refused without being held in memory.
 */
export async function* readCsvStream(stream: ReadableStream<Uint8Array>, options: StreamOptions): AsyncGenerator<CsvRecord> {
  const decoder = new TextDecoder("utf-8", { fatal: true });
  const parser = new CsvParser();
  const reader = stream.getReader();
  let bytes = 0;
  try {
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      bytes += value.byteLength;
      if (bytes > options.maxBytes) throw new CsvStreamError("too_large", `The file is larger than ${formatBytes(options.maxBytes)}; split it into smaller files.`);
      options.onBytes?.(bytes);
      let text: string;
      try {
        text = decoder.decode(value, { stream: true });
      } catch {
        throw new CsvStreamError("not_text", "The file is not UTF-8 text; save it as CSV (UTF-8).");
      }
      yield* parser.push(text);
    }
    try {
      yield* parser.push(decoder.decode());
    } catch {
      throw new CsvStreamError("not_text", "The file is not UTF-8 text; save it as CSV (UTF-8).");
    }
    yield* parser.end();
  } finally {
    await reader.cancel().catch(() => undefined);
    reader.releaseLock();
  }
}

export function formatBytes(bytes: number): string {
  if (bytes >= 1024 * 1024) return `${+(bytes / (1024 * 1024)).toFixed(1)} MB`;
  if (bytes >= 1024) return `${+(bytes / 1024).toFixed(1)} kB`;
  return `${bytes} B`;
}
