import { describe, expect, it } from "vitest";
import { sql } from "../support/db";
import { binaryArray, decodeBinaryArray } from "@/lib/worker/binary-arrays";

// The worker sends its measurement columns as binary arrays and reads readings back the same way;
// PostgreSQL's own array_send is the reference for the format both ways.
describe("binary arrays", () => {
  const cases: [string, Parameters<typeof binaryArray>[1], unknown[], string][] = [
    ["float8 with a NULL", "float8", [1.5, null, -0.000123456789, 343.215], "ARRAY[1.5, NULL, -0.000123456789, 343.215]::float8[]"],
    ["int8", "int8", [1, 4294967296, 9007199254740991, -5], "ARRAY[1, 4294967296, 9007199254740991, -5]::int8[]"],
    ["int4", "int4", [0, 2147483647, -2147483648], "ARRAY[0, 2147483647, -2147483648]::int4[]"],
    ["int2", "int2", [0, 7, -3], "ARRAY[0, 7, -3]::int2[]"],
    ["bool", "bool", [true, false, null], "ARRAY[true, false, NULL]::boolean[]"],
    ["uuid", "uuid", ["6f1c0e1e-1234-4abc-8def-0123456789ab", null], "ARRAY['6f1c0e1e-1234-4abc-8def-0123456789ab', NULL]::uuid[]"],
    ["text with quotes, commas and non-ASCII", "text", ['say "hi"', "x,y", null, "°C"], `ARRAY['say "hi"', 'x,y', NULL, '°C']::text[]`],
    ["bytea", "bytea", [Buffer.from([1, 2, 255]), null, Buffer.alloc(0)], `ARRAY['\\x0102ff'::bytea, NULL, ''::bytea]`],
    // 2026-03-14T06:30:00.123456Z in microseconds since 1970.
    ["timestamptz", "timestamptz", [1773469800123456, 0], "ARRAY['2026-03-14T06:30:00.123456Z', '1970-01-01T00:00:00Z']::timestamptz[]"],
    ["empty float8", "float8", [], "ARRAY[]::float8[]"],
  ];
  it.each(cases)("%s matches array_send and decodes to the same values", async (_label, type, values, literal) => {
    const [row] = await sql<{ bytes: Buffer }>(`SELECT array_send(${literal}) AS bytes`);
    expect(binaryArray(values, type).equals(row.bytes)).toBe(true);
    expect(decodeBinaryArray(row.bytes, type)).toEqual(values);
  });

  it("is read back by PostgreSQL as the same values", async () => {
    const [row] = await sql<{ v: number[] }>(`SELECT $1::float8[] AS v`, [binaryArray([0.1, 2.5e-9, 1e300], "float8")]);
    expect(row.v).toEqual([0.1, 2.5e-9, 1e300]);
  });

  it("refuses an array of another element type", async () => {
    const [row] = await sql<{ bytes: Buffer }>(`SELECT array_send(ARRAY[1, 2]::int4[]) AS bytes`);
    expect(() => decodeBinaryArray(row.bytes, "float8")).toThrow(/float8/);
  });
});
