import { describe, it, expect } from "vitest";
import { DEMO_ASSETS, DEMO_DEVICES } from "@/db/seeds/demo-plan";
import { simDeviceFromPlan } from "@/db/seeds/demo-keys";
import { databaseName, demoKeysFilePath, simulatorStateFilePath } from "@/workers/simulation/keys-file";
import type { OutgoingReading } from "@/workers/simulation/scenario";
import {
  advanceDevice,
  appendToBacklog,
  assignSeqs,
  BACKFILL_STEP_MS,
  isCatchingUp,
  MAX_BATCH,
  newSimulatorState,
  parseSimulatorState,
  reconcileState,
  retryAfterMs,
} from "@/workers/simulation/state";

const MIN = 60_000;
const DAY = 24 * 60 * MIN;
const LIVE = 30_000;
const uuid = (n: number) => `00000000-0000-4000-8000-${String(n).padStart(12, "0")}`;
const ASSET_IDS = Object.fromEntries(DEMO_ASSETS.map((a, i) => [a.key, uuid(1000 + i)]));
const DEVICES = DEMO_DEVICES.map((d, i) => simDeviceFromPlan(d, { deviceId: uuid(i + 1), apiKey: "test", siteId: uuid(100), assetIds: ASSET_IDS }));
const NOW = Date.parse("2026-03-15T12:00:00Z");

/** Runs a device's timeline from its backfill to `untilMs`, delivering every batch, and returns all it sent. */
function runTimeline(deviceIndex: number, days: number, untilMs: number) {
  const d = DEVICES[deviceIndex];
  const state = reconcileState(newSimulatorState(NOW, days), [d], NOW, days);
  const clock = { originMs: state.origin_ms, firstRunMs: state.first_run_ms };
  const sent: OutgoingReading[] = [];
  for (let now = NOW; now <= untilMs; now += LIVE) {
    do {
      advanceDevice(d, state.devices[d.id], now, LIVE, clock);
      // History waits for the batch ahead of it; only the last few minutes' live cycles may queue behind.
      expect(state.devices[d.id].backlog.length).toBeLessThanOrEqual(MAX_BATCH + d.channels.length * (BACKFILL_STEP_MS / LIVE + 1));
      sent.push(...state.devices[d.id].backlog.splice(0, MAX_BATCH));
    } while (isCatchingUp(state.devices[d.id], now));
  }
  return { d, state, sent };
}

describe("seqs", () => {
  it("count up by one per channel, from 1, over backfill and live alike", () => {
    const { d, sent } = runTimeline(0, 1, NOW + 10 * MIN);
    for (const c of d.channels) {
      const seqs = sent.filter((r) => r.channel === c.index).map((r) => r.seq);
      expect(seqs[0]).toBe(1);
      expect(seqs.every((s, i) => i === 0 || s === seqs[i - 1] + 1)).toBe(true);
      expect(seqs.length).toBeGreaterThanOrEqual(288 + 20);
    }
  });

  it("continue where they stopped after the state is saved and read back", () => {
    const state = newSimulatorState(NOW, 1);
    const ds = { next_seq: {}, cursor_ms: NOW, backlog: [] };
    state.devices.x = ds;
    const first = assignSeqs(ds, [{ at: "2026-03-15T12:00:00Z", channel: 0 }, { at: "2026-03-15T12:00:00.080Z", channel: 1 }]);
    const restored = parseSimulatorState(JSON.stringify(state));
    expect(restored).not.toBeNull();
    const next = assignSeqs(restored!.devices.x, [{ at: "2026-03-15T12:00:30Z", channel: 0 }, { at: "2026-03-15T12:00:30.080Z", channel: 1 }]);
    expect(first.map((r) => r.seq)).toEqual([1, 1]);
    expect(next.map((r) => r.seq)).toEqual([2, 2]);
  });

  it("stay with a reading while it waits in the backlog: a resend carries the same seq", () => {
    const ds = { next_seq: {}, cursor_ms: NOW, backlog: [] as OutgoingReading[] };
    appendToBacklog(ds, assignSeqs(ds, [{ at: "2026-03-15T12:00:00Z", channel: 0 }]));
    const firstTry = ds.backlog.slice(0, MAX_BATCH).map((r) => r.seq);
    // The API was down: nothing leaves the backlog, the next cycle queues behind it.
    appendToBacklog(ds, assignSeqs(ds, [{ at: "2026-03-15T12:00:30Z", channel: 0 }]));
    expect(ds.backlog.slice(0, MAX_BATCH).map((r) => r.seq)).toEqual([...firstTry, 2]);
  });
});

describe("the timeline", () => {
  it("backfills at a 5-minute spacing per channel, then goes live at the live interval", () => {
    const { d, sent } = runTimeline(1, 1, NOW + 5 * MIN);
    const times = sent.filter((r) => r.channel === d.channels[0].index).map((r) => Date.parse(r.at));
    const gaps = times.slice(1).map((t, i) => t - times[i]);
    const backfill = times.filter((t) => t + BACKFILL_STEP_MS <= NOW).length;
    expect(backfill).toBeGreaterThanOrEqual(287);
    expect(gaps.slice(0, backfill - 1).every((g) => g === BACKFILL_STEP_MS)).toBe(true);
    expect(gaps.slice(-5).every((g) => g === LIVE)).toBe(true);
    expect(times[0]).toBeGreaterThanOrEqual(NOW - DAY - BACKFILL_STEP_MS);
  });

  it("never dates a reading more than 5 minutes ahead of the clock (the device API rejects those)", () => {
    const { sent } = runTimeline(4, 1, NOW + 2 * MIN);
    expect(Math.max(...sent.map((r) => Date.parse(r.at)))).toBeLessThan(NOW + 2 * MIN + 5 * MIN);
  });

  it("leaves a gap of a few hours in the offline device's history", () => {
    const offline = DEVICES.findIndex((d) => d.behaviour.goes_offline);
    const { d, sent } = runTimeline(offline, 1, NOW);
    const times = sent.filter((r) => r.channel === d.channels[0].index).map((r) => Date.parse(r.at));
    const longest = Math.max(...times.slice(1).map((t, i) => t - times[i]));
    expect(longest).toBeGreaterThanOrEqual(3 * 60 * MIN);
    expect(longest).toBeLessThanOrEqual(4 * 60 * MIN);
  });

  it("drops the oldest readings once the backlog is full", () => {
    const ds = { next_seq: {}, cursor_ms: NOW, backlog: [] as OutgoingReading[] };
    const drafts = Array.from({ length: 12 }, (_, i) => ({ at: new Date(NOW + i * LIVE).toISOString(), channel: 0 }));
    expect(appendToBacklog(ds, assignSeqs(ds, drafts), 10)).toBe(2);
    expect(ds.backlog.map((r) => r.seq)).toEqual([3, 4, 5, 6, 7, 8, 9, 10, 11, 12]);
  });
});

describe("reconciling the state with the keys file", () => {
  it("starts new devices at the backfill window, forgets devices that are gone and clamps a long absence", () => {
    const state = newSimulatorState(NOW - 30 * DAY, 14);
    state.backfill_done = true;
    state.devices[DEVICES[0].id] = { next_seq: { "0": 99 }, cursor_ms: NOW - 20 * DAY, backlog: [] };
    state.devices.gone = { next_seq: {}, cursor_ms: NOW, backlog: [] };
    const next = reconcileState(state, DEVICES.slice(0, 2), NOW, 14);
    expect(Object.keys(next.devices).sort()).toEqual([DEVICES[0].id, DEVICES[1].id].sort());
    expect(next.devices[DEVICES[0].id].cursor_ms).toBe(NOW - 14 * DAY);
    expect(next.devices[DEVICES[0].id].next_seq).toEqual({ "0": 99 });
    expect(next.devices[DEVICES[1].id].cursor_ms).toBeGreaterThanOrEqual(NOW - 14 * DAY - BACKFILL_STEP_MS);
    expect(next.backfill_done).toBe(false);
  });

  it("refuses text that is not a saved state", () => {
    expect(parseSimulatorState("not json")).toBeNull();
    expect(parseSimulatorState(JSON.stringify({ version: 2 }))).toBeNull();
  });
});

describe("Retry-After (RFC 9110 §10.2.3: delay-seconds or an HTTP-date)", () => {
  it("reads seconds and dates, and nothing else", () => {
    expect(retryAfterMs("120", NOW)).toBe(120_000);
    // The RFC's own example date.
    expect(retryAfterMs("Fri, 31 Dec 1999 23:59:59 GMT", Date.parse("1999-12-31T23:59:00Z"))).toBe(59_000);
    expect(retryAfterMs(null, NOW)).toBeNull();
    expect(retryAfterMs("soon", NOW)).toBeNull();
  });
});

describe("file locations", () => {
  it("use the plain names for the product's database and a name of their own for a sandbox's", () => {
    expect(databaseName({})).toBe("halftrip");
    expect(demoKeysFilePath({ DATABASE_URL: "postgres://halftrip:x@127.0.0.1:54329/halftrip" }, "/r")).toBe("/r/.data/demo-device-keys.json");
    expect(simulatorStateFilePath({}, "/r")).toBe("/r/.data/simulator-state.json");
    expect(demoKeysFilePath({ DATABASE_URL: "postgres://postgres@127.0.0.1:54329/halftrip_hb" }, "/r")).toBe("/r/.data/demo-device-keys-halftrip_hb.json");
    expect(demoKeysFilePath({ DEMO_KEYS_FILE: "k.json" }, "/r")).toBe("/r/k.json");
  });
});
