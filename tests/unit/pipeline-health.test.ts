import { describe, it, expect } from "vitest";
import { assessChannel, assessCrosstalk, FlagTracker, apparentSpeedDetails } from "@/lib/worker/compute/health";
import { blankMeasurement } from "@/lib/worker/compute/convert";
import { initialChannelState, type ChannelState } from "@/lib/worker/compute/channel-state";
import { PIPELINE_SETTINGS } from "@/lib/worker/compute/settings";
import type { ChannelConfig, Measurement, MeasurementStatus } from "@/lib/worker/compute/types";
import { bay, channel, practicalSpeed, reading, T0 } from "./pipeline-fixtures";

const minute = (k: number) => T0 + k * 60_000;

function record(c: ChannelConfig, k: number, fields: Partial<Measurement> = {}, status: MeasurementStatus = "ok"): Measurement {
  const m = blankMeasurement(reading({ at: new Date(minute(k)) }), c);
  Object.assign(m, { status, ...fields });
  return m;
}

function finish(c: ChannelConfig, measurements: Measurement[], state: ChannelState = initialChannelState()) {
  const health = assessChannel({ channel: c, measurements, state, offlineSince: null });
  const { open, changes } = health.tracker.finish();
  return { state: { ...health.state, open }, changes, clearsOffline: health.clearsOffline };
}

// Montgomery, Introduction to Statistical Quality Control, 7th ed., §9.1.1, Table 9.2 (REFERENCES.md §5).
const TABLE_9_2 = [9.45, 7.99, 9.29, 11.66, 12.16, 10.18, 8.04, 11.46, 9.2, 10.34, 9.03, 11.47, 10.51, 9.4, 10.08, 9.37, 10.62, 10.31, 8.52, 10.84, 10.9, 9.33, 12.29, 11.5, 10.6, 11.08, 10.38, 11.62, 11.31, 10.52];
const C_PLUS = [0, 0, 0, 1.16, 2.82, 2.5, 0.04, 1.0, 0, 0, 0, 0.97, 0.98, 0, 0, 0, 0.12, 0, 0, 0.34, 0.74, 0, 1.79, 2.79, 2.89, 3.47, 3.35, 4.47, 5.28];

describe("drift: CUSUM on an empty bay's floor residuals", () => {
  const SIGMA = 0.01;
  const FLOOR = 2.5;
  const c = channel({ asset: bay(FLOOR, 1.8) });
  // Residual (distance − floor) = (xᵢ − μ₀)·σ: the table in units of one centimetre.
  const vacant = (k: number, x: number) => record(c, k, { distanceM: FLOOR + (x - 10) * SIGMA, occupied: false });

  it("follows Montgomery's Table 9.2 value by value and signals at period 29 with onset at period 23", () => {
    let state: ChannelState = { ...initialChannelState(), drift: { ...initialChannelState().drift, sigma: SIGMA } };
    for (let i = 0; i < 28; i++) {
      const out = finish(c, [vacant(i, TABLE_9_2[i])], state);
      state = out.state;
      expect(Math.abs(state.drift.cusum.cPlus / SIGMA - C_PLUS[i]), `period ${i + 1}`).toBeLessThanOrEqual(0.006);
      expect(out.changes.opens).toEqual([]);
    }
    const signal = finish(c, [vacant(28, TABLE_9_2[28])], state);
    expect(signal.changes.opens).toHaveLength(1);
    const drift = signal.changes.opens[0];
    expect(drift.flag).toBe("drift");
    // N⁺ = 7 at period 29: the run began at period 23.
    expect(drift.since.getTime()).toBe(minute(22));
    // New mean μ₀ + K + C⁺/N⁺ ≈ 11.25, i.e. a shift of 1.25 σ.
    expect(Math.abs((drift.magnitude as number) - 1.25 * SIGMA)).toBeLessThan(0.0001);
    expect(drift.details).toMatchObject({ reference: "bay_floor", direction: "up" });
  });

  it("learns σ from the first residuals, with the product's floor", () => {
    const warm = finish(c, Array.from({ length: PIPELINE_SETTINGS.driftWarmup }, (_, k) => vacant(k, 10)));
    expect(warm.state.drift.sigma).toBe(PIPELINE_SETTINGS.driftMinSigmaM);
  });

  it("clears the flag once the residuals stay in control for twice the warm-up", () => {
    let state: ChannelState = { ...initialChannelState(), drift: { ...initialChannelState().drift, sigma: SIGMA } };
    state = finish(c, [vacant(0, 16), vacant(1, 16)], state).state;
    expect(state.open.drift).toBeDefined();
    const n = 2 * PIPELINE_SETTINGS.driftWarmup;
    const back = finish(c, Array.from({ length: n }, (_, k) => vacant(2 + k, 10)), state);
    expect(back.changes.clears).toEqual([{ channelId: c.id, flag: "drift", at: new Date(minute(1 + n)) }]);
    expect(back.state.open.drift).toBeUndefined();
  });

  it("ignores readings while the bay is occupied", () => {
    const busy = finish(c, Array.from({ length: 30 }, (_, k) => record(c, k, { distanceM: 1.2, occupied: true })));
    expect(busy.state.drift.warmup).toEqual([]);
  });

  it("tells a temperature error apart: the apparent speed of sound 2·d_ref/t gives back the true air temperature", () => {
    // The air is 30 °C but the reading says 10 °C: the echo is timed over the true floor distance at c(30).
    const tofUs = (2 * FLOOR * 1e6) / practicalSpeed(30);
    const distance = (practicalSpeed(10) * tofUs * 1e-6) / 2;
    const state: ChannelState = { ...initialChannelState(), drift: { ...initialChannelState().drift, sigma: 0.005 } };
    const out = finish(c, [record(c, 0, { distanceM: distance, occupied: false, tofUs, speedOfSoundMs: practicalSpeed(10) })], state);
    const drift = out.changes.opens.find((f) => f.flag === "drift");
    expect(drift?.details.direction).toBe("down");
    expect(Math.abs((drift?.details.apparent_temp_c as number) - 30)).toBeLessThan(0.001);
    expect(apparentSpeedDetails([], 343)).toEqual({});
  });
});

describe("stuck, offline, out of range, no echo, noisy", () => {
  const c = channel();

  it("flags a raw value that never changes, from the run's first reading, and clears when it moves", () => {
    const n = PIPELINE_SETTINGS.stuckSamples;
    const same = Array.from({ length: n + 3 }, (_, k) => record(c, k, { rawValue: 5831, distanceM: 1 }));
    const moved = record(c, n + 3, { rawValue: 5840, distanceM: 1.001 });
    const out = finish(c, [...same, moved]);
    expect(out.changes.intervals).toEqual([expect.objectContaining({ flag: "stuck", since: new Date(minute(0)), clearedAt: new Date(minute(n + 3)) })]);
    const short = finish(c, same.slice(0, n - 1));
    expect(short.changes.opens).toEqual([]);
  });

  it("turns a gap of more than three expected intervals into an offline interval (PRODUCT.md)", () => {
    const out = finish(c, [record(c, 0, { distanceM: 1 }), record(c, 3, { distanceM: 1 }), record(c, 10, { distanceM: 1 })]);
    // 0 → 3 min is exactly three intervals: not yet offline. 3 → 10 min is.
    expect(out.changes.intervals).toEqual([expect.objectContaining({ flag: "offline", since: new Date(minute(6)), clearedAt: new Date(minute(10)), magnitude: 420 })]);
  });

  it("raises out_of_range and no_echo after a run of such readings and clears after as many good ones", () => {
    const n = PIPELINE_SETTINGS.statusRunLength;
    const statuses: MeasurementStatus[] = [...Array(n).fill("too_close"), ...Array(n).fill("ok"), ...Array(n).fill("no_echo")];
    const out = finish(c, statuses.map((s, k) => record(c, k, { distanceM: s === "ok" ? 1 : null }, s)));
    expect(out.changes.intervals).toEqual([expect.objectContaining({ flag: "out_of_range", since: new Date(minute(0)), clearedAt: new Date(minute(2 * n - 1)) })]);
    expect(out.changes.opens).toEqual([expect.objectContaining({ flag: "no_echo", since: new Date(minute(2 * n)), magnitude: n })]);
  });

  it("flags wide bursts as a noisy channel", () => {
    const speed = practicalSpeed(20);
    // A MAD of 100 µs is 1.7 cm of distance.
    const out = finish(c, Array.from({ length: 5 }, (_, k) => record(c, k, { distanceM: 1, spreadUs: 100, speedOfSoundMs: speed }, "noisy")));
    const noisy = out.changes.opens.find((f) => f.flag === "noisy");
    expect(noisy).toBeDefined();
    expect(Math.abs((noisy!.magnitude as number) - (100e-6 * speed) / 2)).toBeLessThan(1e-6);
  });

  it("clears an offline flag with the first reading", () => {
    const out = assessChannel({ channel: c, measurements: [record(c, 0, { distanceM: 1 })], state: initialChannelState(), offlineSince: new Date(minute(-10)) });
    expect(out.clearsOffline).toBe(true);
  });
});

describe("crosstalk risk", () => {
  it("flags both channels of a pair pinged closer than 60 ms (common practice), not a pair 80 ms apart", () => {
    const trackers = new Map([["c0", new FlagTracker("c0", {})], ["c1", new FlagTracker("c1", {})]]);
    assessCrosstalk({ pings: { 0: [T0, T0 + 1000], 1: [T0 + 20, T0 + 1080] }, channelIds: { 0: "c0", 1: "c1" } }, trackers);
    const opened = [...trackers.values()].flatMap((t) => t.finish().changes.opens);
    expect(opened.map((f) => [f.channelId, f.flag, f.magnitude, f.details.with_channel_index])).toEqual([
      ["c0", "crosstalk_risk", 20, 1],
      ["c1", "crosstalk_risk", 20, 0],
    ]);
    // Three channels 20 ms apart in turn: each is flagged with its closest neighbour.
    const three = new Map(["c0", "c1", "c2"].map((id) => [id, new FlagTracker(id, {})]));
    assessCrosstalk({ pings: { 0: [T0], 1: [T0 + 20], 2: [T0 + 40] }, channelIds: { 0: "c0", 1: "c1", 2: "c2" } }, three);
    expect([...three.values()].map((t) => t.finish().changes.opens[0].magnitude)).toEqual([20, 20, 20]);
    const apart = new Map([["c0", new FlagTracker("c0", { crosstalk_risk: { sinceMs: T0 - 1 } })], ["c1", new FlagTracker("c1", {})]]);
    assessCrosstalk({ pings: { 0: [T0], 1: [T0 + 80] }, channelIds: { 0: "c0", 1: "c1" } }, apart);
    expect(apart.get("c0")!.finish().changes.clears).toEqual([{ channelId: "c0", flag: "crosstalk_risk", at: new Date(T0) }]);
  });
});

describe("flag tracker", () => {
  it("clears a flag open before the batch, inserts one opened and cleared inside it, keeps the since of one still open", () => {
    const t = new FlagTracker("c", { stuck: { sinceMs: 100 }, noisy: { sinceMs: 50 } });
    t.clear("stuck", 200);
    t.raise("no_echo", 300, 5, {});
    t.clear("no_echo", 400);
    t.raise("noisy", 500, 0.02, { measure: "sigma_m" });
    const { open, changes } = t.finish();
    expect(changes.clears).toEqual([{ channelId: "c", flag: "stuck", at: new Date(200) }]);
    expect(changes.intervals).toEqual([{ channelId: "c", flag: "no_echo", since: new Date(300), clearedAt: new Date(400), magnitude: 5, details: {} }]);
    expect(changes.opens).toEqual([{ channelId: "c", flag: "noisy", since: new Date(50), magnitude: 0.02, details: { measure: "sigma_m" } }]);
    expect(open).toEqual({ noisy: { sinceMs: 50 } });
  });
});
