import { beforeAll, describe, expect, it } from "vitest";
import { signedIn, type Agent } from "../support/session";
import { sql } from "../support/db";
import { runWorkerOnce } from "../support/worker";
import { createAsset, createDevice, createSite, echoFor, practicalSpeed, sendReadings, type CreatedDevice } from "./worker-support";

// Sensor health through the device API and the worker: a bay's occupancy sessions and the drift of
// its empty-floor distance, a stuck channel, a gap in the history (offline), two channels of one
// device pinged too close together (crosstalk risk). Readings are invented test inputs; the checks
// compare the worker's findings with what was put into them.

const C20 = practicalSpeed(20);
const T0 = Date.now() - 100 * 60_000;
const at = (minute: number, ms = 0) => new Date(T0 + minute * 60_000 + ms).toISOString();
const atMs = (minute: number, ms = 0) => T0 + minute * 60_000 + ms;
// A small repeating jitter of a few tenths of a millimetre, so no two neighbouring readings are equal.
const jitter = (k: number) => [0.0004, -0.0003, 0.0001, -0.0005, 0.0002][k % 5];

interface Flag {
  flag: string;
  since: string;
  cleared_at: string | null;
  magnitude: number | null;
  details: Record<string, unknown>;
}

async function health(agent: Agent, channelId: string): Promise<{ open: Flag[]; cleared: Flag[] }> {
  const res = await agent.get(`/api/channels/${channelId}/health?days=30`);
  if (res.status !== 200) throw new Error(`health: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body;
}

let admin: Agent;
let viewer: Agent;
let bay: { asset: { id: string }; device: CreatedDevice };
let stuck: CreatedDevice;
let crosstalk: CreatedDevice;

const DRIFT_M = 0.03;
const FLOOR_M = 2.5;

beforeAll(async () => {
  [admin, viewer] = await Promise.all([signedIn("admin@halftrip.test"), signedIn("viewer@halftrip.test")]);
  const site = await createSite(admin);
  const bayAsset = await createAsset(admin, site.id, { kind: "bay", floor_distance_m: FLOOR_M, occupied_below_m: 1.8 });
  const point = await createAsset(admin, site.id, { kind: "point" });
  bay = { asset: bayAsset, device: await createDevice(admin, site.id, { channels: [{ index: 0, asset_id: bayAsset.id }] }) };
  stuck = await createDevice(admin, site.id, { channels: [{ index: 0, asset_id: point.id }] });
  crosstalk = await createDevice(admin, site.id, { channels: [{ index: 0 }, { index: 1 }] });

  // The bay: empty floor for 30 minutes, a car (1.2 m to its roof) for minutes 30–34, empty again;
  // from minute 60 the empty floor reads 3 cm long.
  const bayReadings = Array.from({ length: 100 }, (_, k) => {
    const distance = k >= 30 && k < 35 ? 1.2 : FLOOR_M + (k >= 60 ? DRIFT_M : 0) + jitter(k);
    return { seq: k + 1, at: at(k), channel: 0, echo_us: Math.round(echoFor(distance, C20) * 10) / 10, air_temp_c: 20 };
  });
  // The stuck channel sends the very same echo every minute, with a silence from minute 25 to 40.
  const stuckReadings = [...Array.from({ length: 25 }, (_, k) => k), ...Array.from({ length: 5 }, (_, k) => 40 + k)].map((minute, i) => ({
    seq: i + 1,
    at: at(minute),
    channel: 0,
    echo_us: 5831,
    air_temp_c: 20,
  }));
  // Channel 1 pings 20 ms after channel 0, every minute.
  const crosstalkReadings = Array.from({ length: 6 }, (_, k) => [
    { seq: 2 * k + 1, at: at(k), channel: 0, echo_us: 5831 + k, air_temp_c: 20 },
    { seq: 2 * k + 2, at: at(k, 20), channel: 1, echo_us: 6000 + k, air_temp_c: 20 },
  ]).flat();
  await Promise.all([sendReadings(bay.device.apiKey, bayReadings), sendReadings(stuck.apiKey, stuckReadings), sendReadings(crosstalk.apiKey, crosstalkReadings)]);
  await runWorkerOnce({ WORKER_QUIET: "1", WORKER_BATCH_SIZE: "40" });
}, 240_000);

describe("bays", () => {
  it("records the occupancy session, debounced and dated by its first reading", async () => {
    const sessions = await sql(`SELECT started_at, ended_at, duration_s FROM occupancy_sessions WHERE asset_id = $1`, [bay.asset.id]);
    expect(sessions).toHaveLength(1);
    expect(new Date(sessions[0].started_at).getTime()).toBe(atMs(30));
    expect(new Date(sessions[0].ended_at).getTime()).toBe(atMs(35));
    expect(sessions[0].duration_s).toBe(300);
    const res = await viewer.get(`/api/channels/${bay.device.channels[0].id}/measurements?order=asc&limit=100`).expect(200);
    const occupied = res.body.items.map((m: { occupied: boolean }) => m.occupied);
    // Occupied from the second reading under 1.8 m (debounce of two) until the second one back at the floor.
    expect(occupied.slice(29, 37)).toEqual([false, false, true, true, true, true, true, false]);
    const hourly = await viewer.get(`/api/assets/${bay.asset.id}/series?bucket=5m&from=${encodeURIComponent(at(-5))}&to=${encodeURIComponent(at(120))}`).expect(200);
    const total = hourly.body.items.reduce((s: { n: number; occ: number }, b: { n: number; occupied_fraction: number }) => ({ n: s.n + b.n, occ: s.occ + b.occupied_fraction * b.n }), { n: 0, occ: 0 });
    expect(total.n).toBe(100);
    expect(Math.round(total.occ)).toBe(5);
  });

  it("flags drift of the empty floor with its onset and size (CUSUM on reference residuals)", async () => {
    const { open } = await health(viewer, bay.device.channels[0].id);
    const drift = open.find((f) => f.flag === "drift");
    expect(drift).toBeDefined();
    // The shift began with the reading at minute 60; its estimated size is the injected 3 cm.
    expect(new Date(drift!.since).getTime()).toBe(atMs(60));
    expect(Math.abs((drift!.magnitude as number) - DRIFT_M)).toBeLessThan(0.003);
    expect(drift!.details).toMatchObject({ reference: "bay_floor", direction: "up", reference_distance_m: FLOOR_M });
    // The 3 cm are a longer distance at the same temperature: sound seems about 1.2 % slower over the floor.
    expect(drift!.details.speed_ratio as number).toBeGreaterThan(0.985);
    expect(drift!.details.speed_ratio as number).toBeLessThan(1);
  });
});

describe("stuck, offline and crosstalk", () => {
  it("flags a channel whose raw value never changes, from the first reading of the run", async () => {
    const { open } = await health(admin, stuck.channels[0].id);
    const flag = open.find((f) => f.flag === "stuck");
    expect(flag).toBeDefined();
    expect(new Date(flag!.since).getTime()).toBe(atMs(0));
    expect(flag!.details.value).toBe(5831);
  });

  it("takes a gap that one upload fills, and a silence seen only in measurement times, for a data gap, not offline (late-history rule 3)", async () => {
    // Readings every 60 s with none between minutes 24 and 40 and none after 44, all sent together just
    // now: no reading was ever missed as it arrived, so neither is an offline period (PRODUCT.md: offline
    // is no reading for 3 expected intervals; lib/alarms/late-history.ts judges that by arrival).
    const { open, cleared } = await health(admin, stuck.channels[0].id);
    expect(cleared.filter((f) => f.flag === "offline")).toEqual([]);
    expect(open.filter((f) => f.flag === "offline")).toEqual([]);
  });

  it("flags both channels of a device pinged 20 ms apart (60 ms rule, common practice)", async () => {
    for (const [self, other] of [[0, 1], [1, 0]]) {
      const { open } = await health(admin, crosstalk.channels.find((c) => c.index === self)!.id);
      const flag = open.find((f) => f.flag === "crosstalk_risk");
      expect(flag).toBeDefined();
      expect(flag!.magnitude).toBe(20);
      expect(flag!.details.with_channel_index).toBe(other);
    }
  });

  it("leaves healthy channels alone", async () => {
    const { open } = await health(admin, bay.device.channels[0].id);
    expect(open.map((f) => f.flag).sort()).toEqual(["drift"]);
  });
});
