import { describe, it, expect } from "vitest";
import { processBatch, processBatchInSteps, type BatchInput, type ProcessedBatch, type StoredChannelState } from "@/lib/worker/compute/batch";
import { parseChannelState } from "@/lib/worker/compute/channel-state";
import type { TankGeometry } from "@/lib/geometry/tank-volume";
import type { ChannelConfig, ReadingRow } from "@/lib/worker/compute/types";
import { bay, channel, echoFor, point, practicalSpeed, reading, T0, tank } from "./pipeline-fixtures";

const C20 = practicalSpeed(20);
const GEOMETRY: TankGeometry = { shape: "rectangular", length_m: 2, width_m: 1.5, height_m: 2.8 };
const tankChannel = channel({ id: "ch-tank", index: 0, asset: tank(GEOMETRY, 3) });
const bayChannel = channel({ id: "ch-bay", index: 1, asset: bay(2.5, 1.8) });
const pointChannel = channel({ id: "ch-point", index: 2, asset: point(1.5) });
const channels: ChannelConfig[] = [tankChannel, bayChannel, pointChannel];

function input(readings: ReadingRow[], states: Map<string, StoredChannelState> = new Map()): BatchInput {
  return { readings, channels, states, temperatureSamples: new Map(), temperatureChannelSites: new Map() };
}

// Invented test inputs: a tank drawn down with a spike, a bay with a car and a floor that drifts 3 cm,
// a fixed target whose sensor sticks and then goes quiet for a while. Channels ping 80 ms apart.
function history(): ReadingRow[] {
  const out: ReadingRow[] = [];
  const jitter = (k: number) => [0.0004, -0.0003, 0.0001, -0.0005, 0.0002][k % 5];
  for (let k = 0; k < 120; k++) {
    const at = (i: number) => new Date(T0 + k * 60_000 + i * 80);
    const tankDistance = 1 + 0.002 * k + jitter(k) + (k === 70 ? 0.25 : 0);
    const bayDistance = k >= 40 && k < 50 ? 1.2 : 2.5 + (k >= 90 ? 0.03 : 0) + jitter(k + 2);
    out.push(reading({ channel: 0, at: at(0), echoUs: Math.round(echoFor(tankDistance, C20) * 100) / 100, airTempC: 20 }));
    out.push(reading({ channel: 1, at: at(1), echoUs: Math.round(echoFor(bayDistance, C20) * 100) / 100, airTempC: 20 }));
    if (k < 60 || k > 75) out.push(reading({ channel: 2, at: at(2), echoUs: 8740, airTempC: 20 }));
  }
  return out;
}

interface FlagRow {
  channelId: string;
  flag: string;
  since: number;
  clearedAt: number | null;
  magnitude: number | null;
}

/** Applies a batch's flag changes as the database does: clears, then closed intervals, then upserts of open flags. */
function applyFlags(table: FlagRow[], batch: ProcessedBatch): void {
  for (const c of batch.flags.clears) {
    const open = table.find((f) => f.channelId === c.channelId && f.flag === c.flag && f.clearedAt === null);
    if (open) open.clearedAt = Math.max(open.since, c.at.getTime());
  }
  for (const i of batch.flags.intervals) table.push({ channelId: i.channelId, flag: i.flag, since: i.since.getTime(), clearedAt: i.clearedAt.getTime(), magnitude: i.magnitude });
  for (const o of batch.flags.opens) {
    const open = table.find((f) => f.channelId === o.channelId && f.flag === o.flag && f.clearedAt === null);
    if (open) open.magnitude = o.magnitude;
    else table.push({ channelId: o.channelId, flag: o.flag, since: o.since.getTime(), clearedAt: null, magnitude: o.magnitude });
  }
}

const sortFlags = (t: FlagRow[]) => [...t].sort((a, b) => a.channelId.localeCompare(b.channelId) || a.flag.localeCompare(b.flag) || a.since - b.since);
const essentials = (b: ProcessedBatch) =>
  b.measurements
    .map((m) => ({ id: m.reading.id, status: m.status, distance: m.distanceM, level: m.levelM, volume: m.volumeL, occupied: m.occupied }))
    .sort((a, b) => a.id - b.id);

describe("processBatch", () => {
  it("gives the same measurements, flags and state whether a history comes in one batch or resumes from saved state", () => {
    const all = history();
    const single = processBatch(input(all));
    const singleFlags: FlagRow[] = [];
    applyFlags(singleFlags, single);

    // Four batches, each state saved as JSON (as channel_state keeps it) and read back.
    let states = new Map<string, StoredChannelState>();
    const batchedFlags: FlagRow[] = [];
    const measurements: ReturnType<typeof essentials> = [];
    const size = Math.ceil(all.length / 4);
    for (let i = 0; i < all.length; i += size) {
      const out = processBatch(input(all.slice(i, i + size), states));
      applyFlags(batchedFlags, out);
      measurements.push(...essentials(out));
      states = new Map([...out.states].map(([id, s]) => [id, { state: parseChannelState(JSON.parse(JSON.stringify(s))), offlineSince: null }]));
    }
    expect(measurements).toEqual(essentials(single));
    expect(sortFlags(batchedFlags)).toEqual(sortFlags(singleFlags));
    for (const [id, s] of single.states) expect(states.get(id)?.state).toEqual(JSON.parse(JSON.stringify(s)));

    // And the history shows what was put into it.
    expect(single.measurements.filter((m) => m.status === "suspect").map((m) => m.reading.at.getTime())).toEqual([T0 + 70 * 60_000]);
    expect(single.sessions).toEqual([expect.objectContaining({ assetId: "bay-1", start: new Date(T0 + 40 * 60_000 + 80), end: new Date(T0 + 50 * 60_000 + 80) })]);
    const kinds = sortFlags(singleFlags).map((f) => `${f.channelId}:${f.flag}:${f.clearedAt === null ? "open" : "closed"}`);
    expect(kinds).toEqual(["ch-bay:drift:open", "ch-point:offline:closed", "ch-point:stuck:open"]);
  });

  it("turns a site's temperature channel into samples and interpolates them for the other channels", () => {
    const thermo = channel({ id: "ch-thermo", index: 3 });
    const withThermo = [...channels, thermo];
    const out = processBatch({
      readings: [
        reading({ channel: 3, at: new Date(T0), echoUs: 1000, airTempC: 10 }),
        reading({ channel: 3, at: new Date(T0 + 600_000), echoUs: 1000, airTempC: 20 }),
        reading({ channel: 0, at: new Date(T0 + 150_000), echoUs: 5831 }),
      ],
      channels: withThermo,
      states: new Map(),
      temperatureSamples: new Map(),
      temperatureChannelSites: new Map([["ch-thermo", ["site-1"]]]),
    });
    expect(out.newTemperatureSamples).toEqual([
      { siteId: "site-1", atMs: T0, airTempC: 10 },
      { siteId: "site-1", atMs: T0 + 600_000, airTempC: 20 },
    ]);
    const tankMeasurement = out.measurements.find((m) => m.channel?.id === "ch-tank");
    expect(tankMeasurement).toMatchObject({ tempSource: "site_samples", airTempC: 12.5 });
  });

  it("keeps a reading of an unknown channel as an invalid_config measurement", () => {
    const out = processBatch(input([reading({ channel: 6, echoUs: 5831 })]));
    expect(out.measurements).toHaveLength(1);
    expect(out.measurements[0]).toMatchObject({ status: "invalid_config", channel: null });
    expect(out.states.size).toBe(0);
  });
});

describe("processBatchInSteps", () => {
  // Invented fleet: three devices, each with a tank and a bay channel; device-b pings its two channels
  // 20 ms apart (a crosstalk risk), device-c goes quiet for a while (offline). The turned computation
  // must give exactly what processBatch gives, whatever the grouping.
  const devices = ["device-a", "device-b", "device-c"];
  const fleet = devices.flatMap((d) => [
    channel({ id: `${d}-tank`, index: 0, device: { id: d }, asset: tank(GEOMETRY, 3) }),
    channel({ id: `${d}-bay`, index: 1, device: { id: d }, asset: bay(2.5, 1.8) }),
  ]);
  const readings: ReadingRow[] = [];
  for (let k = 0; k < 60; k++) {
    devices.forEach((d, n) => {
      if (d === "device-c" && k >= 20 && k < 30) return;
      const gapMs = d === "device-b" ? 20 : 80;
      const at = (i: number) => new Date(T0 + k * 60_000 + n * 5_000 + i * gapMs);
      readings.push(reading({ deviceId: d, channel: 0, at: at(0), echoUs: Math.round(echoFor(1 + 0.003 * k + (k === 33 ? 0.3 : 0), C20) * 100) / 100, airTempC: 20 }));
      readings.push(reading({ deviceId: d, channel: 1, at: at(1), echoUs: Math.round(echoFor(k % 20 < 8 ? 1.2 : 2.5, C20) * 100) / 100, airTempC: 20 }));
    });
  }
  readings.push(reading({ deviceId: "device-unknown", channel: 0, at: new Date(T0), echoUs: 5000 }));
  readings.sort((a, b) => a.at.getTime() - b.at.getTime()).forEach((r, i) => (r.id = i + 1));
  const batchInput: BatchInput = { readings, channels: fleet, states: new Map(), temperatureSamples: new Map(), temperatureChannelSites: new Map() };

  const byId = (b: ProcessedBatch) => [...b.measurements].sort((x, y) => x.reading.id - y.reading.id);
  const flagKey = (f: { channelId: string; flag: string }) => `${f.channelId}:${f.flag}`;
  const sortedFlags = (b: ProcessedBatch) => ({
    clears: [...b.flags.clears].sort((x, y) => flagKey(x).localeCompare(flagKey(y))),
    intervals: [...b.flags.intervals].sort((x, y) => flagKey(x).localeCompare(flagKey(y))),
    opens: [...b.flags.opens].sort((x, y) => flagKey(x).localeCompare(flagKey(y))),
  });

  for (const devicesPerTurn of [1, 2, 50]) {
    it(`gives processBatch's measurements, sessions, states and flags (${devicesPerTurn} device(s) a turn)`, async () => {
      const whole = processBatch(batchInput);
      let pauses = 0;
      const turned = await processBatchInSteps(batchInput, async () => void pauses++, devicesPerTurn);
      expect(byId(turned)).toEqual(byId(whole));
      expect(new Map([...turned.states].sort())).toEqual(new Map([...whole.states].sort()));
      expect(sortedFlags(turned)).toEqual(sortedFlags(whole));
      expect([...turned.sessions].sort((x, y) => x.channelId.localeCompare(y.channelId) || x.start.getTime() - y.start.getTime())).toEqual(
        [...whole.sessions].sort((x, y) => x.channelId.localeCompare(y.channelId) || x.start.getTime() - y.start.getTime()),
      );
      // Conversion, then one turn per group of devices (the unknown device's readings are a group of their own).
      expect(pauses).toBe(1 + Math.ceil(4 / devicesPerTurn));
      // The comparison is worth something only if the fleet raised what it was built to raise.
      expect(new Set(whole.flags.opens.map((f) => f.flag))).toEqual(new Set(["crosstalk_risk"]));
      expect(whole.flags.intervals.map(flagKey)).toContain("device-c-tank:offline");
      expect(whole.sessions.length).toBeGreaterThan(3);
      expect(whole.measurements.some((m) => m.status === "invalid_config")).toBe(true);
    });
  }
});
