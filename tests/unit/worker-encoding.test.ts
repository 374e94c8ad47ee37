import { describe, expect, it } from "vitest";
import { decodeBinaryArray } from "@/lib/worker/binary-arrays";
import { encodeMeasurements, rollUp, SENT_COLUMNS } from "@/lib/worker/encode";
import { blankMeasurement } from "@/lib/worker/compute/convert";
import type { Measurement } from "@/lib/worker/compute/types";
import { bay, channel, reading, T0 } from "./pipeline-fixtures";

// The worker's write path encodes a batch column by column; decoding the arrays again must give back
// each record's own fields, in order (the database's reading of the same format is checked against
// array_send in tests/api/worker-binary.test.ts, and the rollups against PostgreSQL's own sums in
// tests/api/worker-concurrency.test.ts).
const D1 = "6f1c0e1e-0000-4000-8000-0000000000d1";
const D2 = "6f1c0e1e-0000-4000-8000-0000000000d2";
const bayA = channel({ id: "6f1c0e1e-0000-4000-8000-0000000000c1", asset: { ...bay(), id: "6f1c0e1e-0000-4000-8000-0000000000a1" } });
const loose = channel({ id: "6f1c0e1e-0000-4000-8000-0000000000c2", index: 1 });

function record(deviceId: string, ch: typeof bayA | null, minute: number, fields: Partial<Measurement>): Measurement {
  const r = reading({ deviceId, channel: ch?.index ?? 7, at: new Date(T0 + minute * 60_000) });
  return Object.assign(blankMeasurement(r, ch), fields);
}

describe("encoding a batch's measurements", () => {
  const batch = [
    record(D1, bayA, 0, { distanceM: 2.5, occupied: false, tofUs: 14_600.5, airTempC: 12, tempSource: "reading" }),
    record(D1, bayA, 1, { distanceM: 1.2, occupied: true, tofUs: Number.NaN }),
    record(D1, loose, 1, { distanceM: 0.8, status: "noisy", statusDetail: 'spread "wide"' }),
    record(D2, null, 2, { status: "invalid_config", statusDetail: "no channel 7" }),
  ];
  // Every reading 123 µs past its millisecond, as the claim layer hands those back beside the records.
  const columns = encodeMeasurements(batch, new Map(batch.map((m) => [m.reading.id, 123])));
  // A column by its name; the three dictionaries follow the named columns.
  const column = (name: string) => {
    const i = SENT_COLUMNS.findIndex(([n]) => n === name);
    if (i < 0) throw new Error(`no column ${name}`);
    return columns[i];
  };
  const dictionary = (k: 1 | 2 | 3) => columns[SENT_COLUMNS.length + k - 1];

  it("keeps every field of every record in its column", () => {
    expect(columns).toHaveLength(SENT_COLUMNS.length + 3);
    expect(decodeBinaryArray(column("reading_id"), "int8")).toEqual(batch.map((m) => m.reading.id));
    expect(decodeBinaryArray(column("at"), "timestamptz")).toEqual(batch.map((m) => m.reading.at.getTime() * 1000 + 123));
    expect(decodeBinaryArray(column("channel_index"), "int2")).toEqual([0, 0, 1, 7]);
    expect(decodeBinaryArray(column("status"), "text")).toEqual(["ok", "ok", "noisy", "invalid_config"]);
    expect(decodeBinaryArray(column("status_detail"), "text")).toEqual([null, null, 'spread "wide"', "no channel 7"]);
    // A value that is not a finite number is stored as NULL.
    expect(decodeBinaryArray(column("tof_us"), "float8")).toEqual([14_600.5, null, null, null]);
    expect(decodeBinaryArray(column("air_temp_c"), "float8")).toEqual([12, null, null, null]);
    expect(decodeBinaryArray(column("temp_source"), "text")).toEqual(["reading", null, null, null]);
    expect(decodeBinaryArray(column("distance_m"), "float8")).toEqual([2.5, 1.2, 0.8, null]);
    expect(decodeBinaryArray(column("occupied"), "bool")).toEqual([false, true, null, null]);
  });

  it("names devices, channels and assets by their place in the dictionaries that follow", () => {
    const devices = decodeBinaryArray(dictionary(1), "uuid");
    const channels = decodeBinaryArray(dictionary(2), "uuid");
    const assets = decodeBinaryArray(dictionary(3), "uuid");
    const deviceOf = decodeBinaryArray(column("device_n"), "int4").map((n) => devices[n! - 1]);
    const channelOf = decodeBinaryArray(column("channel_n"), "int4").map((n) => (n === null ? null : channels[n - 1]));
    const assetOf = decodeBinaryArray(column("channel_n"), "int4").map((n) => (n === null ? null : assets[n - 1]));
    expect(deviceOf).toEqual([D1, D1, D1, D2]);
    expect(channelOf).toEqual([bayA.id, bayA.id, loose.id, null]);
    expect(assetOf).toEqual([bayA.asset!.id, bayA.asset!.id, null, null]);
  });

  it("rolls up only channels that serve an asset, into 5-minute and hourly buckets from 2000-01-01", () => {
    const buckets = rollUp(batch);
    // 06:30 and 06:31 UTC share the 06:30 five-minute bucket and the 06:00 hour.
    expect(buckets.map((b) => [b.bucketS, new Date(b.startMicros / 1000).toISOString(), b.nAll, b.n, b.sum[0], b.occupiedN])).toEqual([
      [300, "2026-03-14T06:30:00.000Z", 2, 2, 3.7, 1],
      [3600, "2026-03-14T06:00:00.000Z", 2, 2, 3.7, 1],
    ]);
  });
});
