import { describe, it, expect } from "vitest";
import { parseNumberCell, parseTimestampCell, readHeader } from "@/lib/csv/columns";
import { dipRowReader, readingRowReader, strappingRowReader, temperatureRowReader, type CellLookup } from "@/lib/csv/import-rows";
import { runImport, type ImportSink } from "@/lib/csv/import-engine";

const cells = (o: Record<string, string>): CellLookup => (c) => o[c];
const streamOf = (text: string) =>
  new ReadableStream<Uint8Array>({
    start(controller) {
      controller.enqueue(new TextEncoder().encode(text));
      controller.close();
    },
  });

describe("header", () => {
  const spec = { required: ["at", "level_m"], optional: ["note"] };

  it("maps columns in any order and case", () => {
    expect(readHeader([" Level_M", "AT"], spec)).toEqual({ ok: true, index: { level_m: 0, at: 1 } });
  });

  it("names missing, unknown and repeated columns on line 1", () => {
    const r = readHeader(["at", "at", "depth"], spec);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toBe('Line 1: wrong columns — missing level_m; unknown "depth"; repeated at. Expected the columns at, level_m (optional: note).');
  });

  it("names a semicolon or tab delimiter as the cause", () => {
    for (const [text, word] of [["at;level_m", "semicolons"], ["at\tlevel_m", "tabs"]]) {
      const r = readHeader([text], spec);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.message).toContain(`separated by ${word}`);
    }
  });
});

describe("cells", () => {
  it("reads decimal numbers with a point, and names a decimal comma", () => {
    expect(parseNumberCell("x", " 1.25 ")).toEqual({ ok: true, value: 1.25 });
    expect(parseNumberCell("x", "-3e-2")).toEqual({ ok: true, value: -0.03 });
    expect(parseNumberCell("x", "1,25")).toEqual({ ok: false, message: 'x "1,25" uses a decimal comma; write 1.25' });
    for (const bad of ["", "1.2.3", "12 mm", "Infinity", "0x10", "NaN"]) expect(parseNumberCell("x", bad).ok).toBe(false);
  });

  it("reads RFC 3339 §5.8's example date-times", () => {
    // RFC 3339 §5.8: 1996-12-19T16:39:57-08:00 is 1996-12-20T00:39:57Z; fractions and +hh:mm offsets allowed.
    const cases: [string, string][] = [
      ["1985-04-12T23:20:50.52Z", "1985-04-12T23:20:50.520Z"],
      ["1996-12-19T16:39:57-08:00", "1996-12-20T00:39:57.000Z"],
      ["1937-01-01T12:00:27.87+00:20", "1937-01-01T11:40:27.870Z"],
      ["2026-03-14 06:30Z", "2026-03-14T06:30:00.000Z"],
      ["2026-03-14T07:30:00+0100", "2026-03-14T06:30:00.000Z"],
    ];
    for (const [text, utc] of cases) {
      const r = parseTimestampCell("at", text);
      expect(r.ok && r.value.toISOString()).toBe(utc);
    }
  });

  it("refuses dates that do not exist, lack a zone or are not dates", () => {
    expect(parseTimestampCell("at", "2026-02-29T10:00:00Z")).toEqual({ ok: false, message: 'at "2026-02-29T10:00:00Z" is not a real date and time' });
    // 2028 is a leap year (Gregorian rule), so its 29 February exists.
    expect(parseTimestampCell("at", "2028-02-29T10:00:00Z").ok).toBe(true);
    expect(parseTimestampCell("at", "2026-03-14 06:30").ok).toBe(false);
    const noZone = parseTimestampCell("at", "2026-03-14T06:30:00");
    expect(!noZone.ok && noZone.message).toMatch(/has no time zone/);
    expect(parseTimestampCell("at", "14/03/2026 06:30").ok).toBe(false);
  });
});

describe("row readers", () => {
  const now = Date.parse("2026-03-14T12:00:00Z");

  it("reads a backfill reading with the device API's rules", () => {
    const reader = readingRowReader({ profile: "capture", timerBits: 16, channels: [0, 1] }, now);
    expect(reader.columns.required).toEqual(["seq", "at", "channel", "ticks"]);
    const good = reader.read(cells({ seq: "7", at: "2026-03-14T06:30:00Z", channel: "1", ticks: "11663", overflows: "", air_temp_c: "11.5" }));
    expect(good).toEqual({ ok: true, key: "1:7", row: { seq: 7, at: "2026-03-14T06:30:00.000Z", channel: 1, ticks: 11663, air_temp_c: 11.5 } });
    const wide = reader.read(cells({ seq: "8", at: "2026-03-14T06:30:00Z", channel: "0", ticks: "70000" }));
    expect(!wide.ok && wide.message).toMatch(/below 2\^16/);
    const future = reader.read(cells({ seq: "9", at: "2026-03-14T13:00:00Z", channel: "0", ticks: "1" }));
    expect(!future.ok && future.message).toMatch(/in the future/);
    const fraction = reader.read(cells({ seq: "1.5", at: "2026-03-14T06:30:00Z", channel: "0", ticks: "1" }));
    expect(!fraction.ok && fraction.message).toMatch(/seq "1.5" is not a whole number/);
  });

  it("reads a strapping table from the bottom up and refuses a falling volume", () => {
    const reader = strappingRowReader();
    expect(reader.read(cells({ level_m: "0", volume_l: "0" })).ok).toBe(true);
    expect(reader.read(cells({ level_m: "1", volume_l: "900" })).ok).toBe(true);
    const falling = reader.read(cells({ level_m: "1.5", volume_l: "800" }));
    expect(!falling.ok && falling.message).toMatch(/cannot fall/);
    const down = reader.read(cells({ level_m: "0.5", volume_l: "950" }));
    expect(!down.ok && down.message).toMatch(/bottom up/);
    expect(reader.read(cells({ level_m: "1.5", volume_l: "1400" })).ok).toBe(true);
  });

  it("refuses a dip above the tank and a temperature out of range", () => {
    const dips = dipRowReader(2.8, { now: new Date(now), assetCreatedAt: new Date("2026-03-01T00:00:00Z") });
    const high = dips.read(cells({ at: "2026-03-14T06:30:00Z", level_m: "2.9" }));
    expect(!high.ok && high.message).toMatch(/The tank is 2.800 m deep/);
    const early = dips.read(cells({ at: "2020-06-01T08:00:00Z", level_m: "1" }));
    expect(!early.ok && early.message).toMatch(/before this tank had any data/);
    expect(dips.read(cells({ at: "2026-03-14T06:30:00Z", level_m: "2.8", note: " " }))).toMatchObject({ ok: true, row: { level_m: 2.8, note: null } });
    const temps = temperatureRowReader(now);
    expect(temps.read(cells({ at: "2026-03-14T06:30:00Z", air_temp_c: "-61" })).ok).toBe(false);
    expect(temps.read(cells({ at: "2026-03-14T06:30:00Z", air_temp_c: "-5.5" }))).toMatchObject({ ok: true, row: { air_temp_c: -5.5 } });
  });
});

describe("import loop", () => {
  const now = Date.parse("2026-03-14T12:00:00Z");
  function memorySink<T>(refuse: (row: T) => boolean = () => false) {
    const written: T[] = [];
    const sink: ImportSink<T> = {
      async write(rows) {
        const refused = rows.filter((r) => refuse(r.row));
        written.push(...rows.filter((r) => !refuse(r.row)).map((r) => r.row));
        return refused.map((r) => ({ line: r.line, message: "already stored" }));
      },
    };
    return { sink, written };
  }

  const file = ["at,air_temp_c", "2026-03-14T06:00:00Z,4", "2026-03-14T07:00:00Z,x", "2026-03-14T06:00:00Z,5", "2026-03-14T08:00:00Z,6,extra", "2026-03-14T09:00:00Z,7"].join("\n");

  it("stops writing at the first error in all-or-nothing mode but lists every error", async () => {
    const { sink, written } = memorySink();
    const out = await runImport(streamOf(file), { reader: temperatureRowReader(now), sink, maxBytes: 1e6, maxListedErrors: 10, stopWritingOnError: true, batchSize: 1 });
    expect(out.fatal).toBeNull();
    expect(out.errors.map((e) => e.line)).toEqual([3, 4, 5]);
    expect(out.errors[1].message).toBe("repeats line 2 (time 2026-03-14T06:00:00.000Z)");
    expect(out.errors[2].message).toMatch(/3 fields where the header has 2/);
    // Line 2 went out before the first error; nothing after it did (the caller rolls line 2 back).
    expect(written).toHaveLength(1);
    expect(out.linesRead).toBe(6);
  });

  it("writes every good row in good-rows mode and counts rows the store refuses", async () => {
    const { sink, written } = memorySink<{ air_temp_c: number }>((r) => r.air_temp_c === 7);
    const out = await runImport(streamOf(file), { reader: temperatureRowReader(now), sink, maxBytes: 1e6, maxListedErrors: 2, stopWritingOnError: false });
    expect(written.map((r) => r.air_temp_c)).toEqual([4]);
    expect(out.rowsValid).toBe(1);
    expect(out.rowsWritten).toBe(1);
    expect(out.errorCount).toBe(4);
    expect(out.errors).toHaveLength(2);
  });

  it("treats a bad header, an empty file and too many rows as the file's problem", async () => {
    const run = (text: string, maxRows?: number) =>
      runImport(streamOf(text), { reader: temperatureRowReader(now), sink: memorySink().sink, maxBytes: 1e6, maxListedErrors: 10, stopWritingOnError: true, maxRows });
    expect((await run("when,temp\n1,2\n")).fatal).toMatch(/^Line 1: wrong columns/);
    expect((await run("")).fatal).toMatch(/file is empty/);
    expect((await run("at,air_temp_c\n")).fatal).toBe("The file has a header but no rows.");
    expect((await run(file, 3)).fatal).toMatch(/more than 3 rows/);
    expect((await runImport(streamOf(file), { reader: temperatureRowReader(now), sink: memorySink().sink, maxBytes: 10, maxListedErrors: 10, stopWritingOnError: true })).fatal).toMatch(/larger than 10 B/);
  });
});
