// The import loop shared by every kind: read the CSV as it streams in, check the header, read each row,
// name repeated rows, hand good rows to the sink in batches and report progress. It keeps no file in
// memory; the caller owns the transaction and decides from the outcome whether to commit.

import { readHeader } from "./columns";
import { CsvStreamError, readCsvStream, type CsvRecord } from "./parse";
import type { RowReader } from "./import-rows";

export interface LineError {
  line: number;
  message: string;
}

export interface ImportProgress {
  bytesRead: number;
  linesRead: number;
  rowsValid: number;
  errorCount: number;
}

export interface ImportOutcome extends ImportProgress {
  /** Rows the sink stored (in the caller's transaction). */
  rowsWritten: number;
  /** The first `maxListedErrors` errors, by line. */
  errors: LineError[];
  /** A problem with the file as a whole (size, encoding, header, no rows): nothing may be imported. */
  fatal: string | null;
}

export interface ImportSink<T> {
  /** Stores a batch; answers the lines it refused (already stored, say). */
  write: (rows: { line: number; row: T }[]) => Promise<LineError[]>;
}

export interface ImportOptions<T> {
  reader: RowReader<T>;
  sink: ImportSink<T>;
  maxBytes: number;
  maxListedErrors: number;
  /** Stop handing rows to the sink after the first error (all-or-nothing: they would be rolled back). */
  stopWritingOnError: boolean;
  /** At most this many data rows; more is a problem with the file. */
  maxRows?: number;
  batchSize?: number;
  onProgress?: (progress: ImportProgress) => void;
}

export async function runImport<T>(stream: ReadableStream<Uint8Array>, options: ImportOptions<T>): Promise<ImportOutcome> {
  const { reader, sink, maxListedErrors, stopWritingOnError, batchSize = 1000 } = options;
  const outcome: ImportOutcome = { bytesRead: 0, linesRead: 0, rowsValid: 0, errorCount: 0, rowsWritten: 0, errors: [], fatal: null };
  const addError = (line: number, message: string) => {
    outcome.errorCount += 1;
    if (outcome.errors.length < maxListedErrors) outcome.errors.push({ line, message });
  };
  const progress = () => options.onProgress?.({ bytesRead: outcome.bytesRead, linesRead: outcome.linesRead, rowsValid: outcome.rowsValid, errorCount: outcome.errorCount });

  let header: { index: Record<string, number>; width: number } | null = null;
  const firstLineOfKey = new Map<string, number>();
  let batch: { line: number; row: T }[] = [];
  let dataRows = 0;

  const flush = async () => {
    if (batch.length === 0) return;
    const rows = batch;
    batch = [];
    if (stopWritingOnError && outcome.errorCount > 0) return;
    const refused = await sink.write(rows);
    for (const e of refused) addError(e.line, e.message);
    outcome.rowsValid -= refused.length;
    outcome.rowsWritten += rows.length - refused.length;
  };

  const readRecord = (record: CsvRecord): void => {
    if (!header) return;
    if (record.error) return addError(record.line, record.error);
    if (record.fields.length !== header.width) {
      return addError(
        record.line,
        `${record.fields.length} field${record.fields.length === 1 ? "" : "s"} where the header has ${header.width}; check for a decimal comma or an unquoted comma`,
      );
    }
    const index = header.index;
    const result = reader.read((column) => (column in index ? record.fields[index[column]] : undefined));
    if (!result.ok) return addError(record.line, result.message);
    const earlier = firstLineOfKey.get(result.key);
    if (earlier !== undefined) return addError(record.line, `repeats line ${earlier} (${reader.describeKey(result.key)})`);
    firstLineOfKey.set(result.key, record.line);
    outcome.rowsValid += 1;
    batch.push({ line: record.line, row: result.row });
  };

  try {
    const records = readCsvStream(stream, { maxBytes: options.maxBytes, onBytes: (bytes) => (outcome.bytesRead = bytes) });
    for await (const record of records) {
      outcome.linesRead = record.line;
      if (!header) {
        const checked = readHeader(record.fields, reader.columns);
        if (!checked.ok) {
          outcome.fatal = checked.message;
          break;
        }
        header = { index: checked.index, width: record.fields.length };
        continue;
      }
      dataRows += 1;
      if (options.maxRows !== undefined && dataRows > options.maxRows) {
        outcome.fatal = `The file has more than ${options.maxRows} rows; this import takes at most ${options.maxRows}.`;
        break;
      }
      readRecord(record);
      if (batch.length >= batchSize) await flush();
      if (dataRows % 500 === 0) progress();
    }
    if (!outcome.fatal) {
      await flush();
      if (!header) outcome.fatal = "The file is empty; the first line must name the columns.";
      else if (dataRows === 0) outcome.fatal = "The file has a header but no rows.";
    }
  } catch (err) {
    if (!(err instanceof CsvStreamError)) throw err;
    outcome.fatal = err.message;
  }
  progress();
  return outcome;
}
