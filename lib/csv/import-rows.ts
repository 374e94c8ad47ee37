// One CSV row of each import kind → a typed row or a message saying what is wrong with it. Each reader
// also gives the row's identity (its key), so the import can name a row that repeats an earlier one.

import { describeZodError } from "../http/errors";
import { checkReadingForDevice, readingSchema, type DeviceRules, type ReadingInput } from "../validations/reading";
import { dipLevelSchema, dipNoteSchema } from "../validations/dip";
import { dipDateQuestion, dipLevelQuestion, type DipDateFacts } from "../input-checks/questions";
import { importColumns, strappingRowSchema, temperatureRowSchema } from "../validations/import";
import { parseIntegerCell, parseNumberCell, parseOptionalNumberCell, parseTimestampCell, type Cell, type ColumnSpec } from "./columns";

export type RowResult<T> = { ok: true; row: T; key: string } | { ok: false; message: string };

/** Cell text by column name; undefined for a column the file does not have. */
export type CellLookup = (column: string) => string | undefined;

export interface RowReader<T> {
  columns: ColumnSpec;
  /** What makes a repeated row: "seq 12 on channel 0", "time 2026-03-14T06:30:00Z". */
  describeKey: (key: string) => string;
  read: (cell: CellLookup) => RowResult<T>;
}

function firstProblem(cells: Cell<unknown>[]): string | null {
  const bad = cells.filter((c): c is { ok: false; message: string } => !c.ok);
  return bad.length ? bad.map((c) => c.message).join("; ") : null;
}

const MAX_FUTURE_MS = 5 * 60 * 1000;

function notInFuture(at: Date, now: number, limitMs: number): string | null {
  return at.getTime() > now + limitMs ? `at ${at.toISOString()} lies in the future; check the clock or the zone` : null;
}

export type BackfillReading = ReadingInput & { at: string };

/** Backfill readings for one device: seq, at, channel and the device profile's signal fields. */
export function readingRowReader(device: DeviceRules, now: number): RowReader<BackfillReading> {
  const columns = importColumns("readings", device.profile);
  const numeric = [...columns.required, ...columns.optional].filter((c) => !["seq", "at", "channel"].includes(c));
  return {
    columns,
    describeKey: (key) => {
      const [channel, seq] = key.split(":");
      return `seq ${seq} on channel ${channel}`;
    },
    read(cell) {
      const seq = parseIntegerCell("seq", cell("seq") ?? "");
      const channel = parseIntegerCell("channel", cell("channel") ?? "");
      const at = parseTimestampCell("at", cell("at") ?? "");
      const values = numeric.map((column) => [column, columns.required.includes(column) ? parseNumberCell(column, cell(column) ?? "") : parseOptionalNumberCell(column, cell(column))] as const);
      const problem = firstProblem([seq, channel, at, ...values.map(([, v]) => v)]);
      if (problem || !seq.ok || !channel.ok || !at.ok) return { ok: false, message: problem ?? "unreadable row" };
      const candidate: Record<string, unknown> = { seq: seq.value, channel: channel.value, at: at.value.toISOString() };
      for (const [column, value] of values) if (value.ok && value.value !== undefined) candidate[column] = value.value;
      const parsed = readingSchema.safeParse(candidate);
      if (!parsed.success) return { ok: false, message: describeZodError(parsed.error) };
      const rule = checkReadingForDevice(parsed.data, device, now);
      if (rule) return { ok: false, message: rule };
      return { ok: true, row: parsed.data as BackfillReading, key: `${parsed.data.channel}:${parsed.data.seq}` };
    },
  };
}

export interface StrappingRow {
  level_m: number;
  volume_l: number;
}

/**
 * A strapping table from the bottom up: each level above the one before, volume never falling
 * (API MPMS Ch. 2.2A tables are listed so); the reader remembers the last good row to check this.
 */
export function strappingRowReader(): RowReader<StrappingRow> {
  let last: StrappingRow | null = null;
  return {
    columns: importColumns("strapping"),
    describeKey: (key) => `level ${key} m`,
    read(cell) {
      const level = parseNumberCell("level_m", cell("level_m") ?? "");
      const volume = parseNumberCell("volume_l", cell("volume_l") ?? "");
      const problem = firstProblem([level, volume]);
      if (problem || !level.ok || !volume.ok) return { ok: false, message: problem ?? "unreadable row" };
      const parsed = strappingRowSchema.safeParse({ level_m: level.value, volume_l: volume.value });
      if (!parsed.success) return { ok: false, message: describeZodError(parsed.error) };
      const row = parsed.data;
      const key = String(row.level_m);
      if (last && row.level_m < last.level_m) return { ok: false, message: `level_m ${row.level_m} is below the row before (${last.level_m}); list the levels from the bottom up` };
      if (last && row.level_m > last.level_m && row.volume_l < last.volume_l) {
        return { ok: false, message: `volume_l ${row.volume_l} is less than at the level below (${last.volume_l} L); volume cannot fall as the level rises` };
      }
      if (!last || row.level_m > last.level_m) last = row;
      return { ok: true, row, key };
    },
  };
}

export interface DipRow {
  at: Date;
  level_m: number;
  note: string | null;
}

/** Manual dips of one tank: at, level_m and an optional note; a level above the tank, or a time in the future or before the tank's data, is refused. */
export function dipRowReader(maxLevelM: number | null, dates: DipDateFacts): RowReader<DipRow> {
  return {
    columns: importColumns("dips"),
    describeKey: (key) => `time ${new Date(Number(key)).toISOString()}`,
    read(cell) {
      const at = parseTimestampCell("at", cell("at") ?? "");
      const level = parseNumberCell("level_m", cell("level_m") ?? "");
      const problem = firstProblem([at, level]);
      if (problem || !at.ok || !level.ok) return { ok: false, message: problem ?? "unreadable row" };
      const when = dipDateQuestion(at.value, dates);
      if (when) return { ok: false, message: `at ${at.value.toISOString()}: ${when.message}` };
      const levelOk = dipLevelSchema.safeParse(level.value);
      if (!levelOk.success) return { ok: false, message: `level_m: ${describeZodError(levelOk.error)}` };
      const depth = dipLevelQuestion(level.value, maxLevelM);
      if (depth) return { ok: false, message: `level_m ${level.value}: ${depth.message}` };
      const note = dipNoteSchema.safeParse(cell("note") ?? "");
      if (!note.success) return { ok: false, message: `note: ${describeZodError(note.error)}` };
      return { ok: true, row: { at: at.value, level_m: level.value, note: note.data || null }, key: String(at.value.getTime()) };
    },
  };
}

export interface TemperatureRow {
  at: Date;
  air_temp_c: number;
}

/** A site's air temperature series: at and air_temp_c. */
export function temperatureRowReader(now: number): RowReader<TemperatureRow> {
  return {
    columns: importColumns("temperature"),
    describeKey: (key) => `time ${new Date(Number(key)).toISOString()}`,
    read(cell) {
      const at = parseTimestampCell("at", cell("at") ?? "");
      const temp = parseNumberCell("air_temp_c", cell("air_temp_c") ?? "");
      const problem = firstProblem([at, temp]);
      if (problem || !at.ok || !temp.ok) return { ok: false, message: problem ?? "unreadable row" };
      const future = notInFuture(at.value, now, MAX_FUTURE_MS);
      if (future) return { ok: false, message: future };
      const parsed = temperatureRowSchema.safeParse({ air_temp_c: temp.value });
      if (!parsed.success) return { ok: false, message: describeZodError(parsed.error) };
      return { ok: true, row: { at: at.value, air_temp_c: temp.value }, key: String(at.value.getTime()) };
    },
  };
}
