import { beforeAll, describe, expect, it } from "vitest";
import { signedIn, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { sql } from "../support/db";
import { runWorkerOnce } from "../support/worker";
import { echoFor, practicalSpeed, sendReadings } from "./worker-support";

// Recompute (issue 4): a calibration applied from manual dips, and a change of the tank's mounting,
// rebuild the channel's measurements and rollups in the background; doing it twice gives the same rows.

const C20 = practicalSpeed(20);
const T0 = Date.now() - 90 * 60_000;
const at = (minute: number) => new Date(T0 + minute * 60_000).toISOString();
// The sensor reads 2 cm short: the true distance is 2 cm longer than it says.
const SENSOR_SHORT_M = 0.02;
const distanceAt = (minute: number) => 1 + 0.005 * minute;

type Item = { at: string; status: string; distance_m: number; raw_distance_m: number; level_m: number; volume_l: number };

let admin: Agent;
let technician: Agent;
let tank: Awaited<ReturnType<typeof createTankWithDevice>>;

async function items(): Promise<Item[]> {
  const res = await admin.get(`/api/channels/${tank.device.channels[0].id}/measurements?order=asc&limit=1000`).expect(200);
  return res.body.items;
}

const rollups = () =>
  sql(`SELECT bucket_s, bucket_start, n_all, n, level_sum, level_min, level_max, volume_sum FROM measurement_rollups WHERE asset_id = $1 ORDER BY bucket_s, bucket_start`, [tank.tank.id]);

beforeAll(async () => {
  [admin, technician] = await Promise.all([signedIn("admin@halftrip.test"), signedIn("technician@halftrip.test")]);
  tank = await createTankWithDevice(admin, { device: { expected_interval_s: 3600 } });
  await sendReadings(
    tank.apiKey,
    Array.from({ length: 61 }, (_, k) => ({ seq: k + 1, at: at(k), channel: 0, echo_us: Math.round(echoFor(distanceAt(k), C20) * 100) / 100, air_temp_c: 20 })),
  );
  await runWorkerOnce({ WORKER_QUIET: "1" });
}, 240_000);

describe("recompute", () => {
  it("applies a calibration from dips to every measurement and rollup", async () => {
    const before = await items();
    expect(before).toHaveLength(61);
    expect(before.every((m) => m.status === "ok")).toBe(true);
    // Two dips: the true level is 2 cm below what the sensor makes of the tank.
    const dipIds: string[] = [];
    for (const minute of [10, 50]) {
      const res = await technician.post(`/api/assets/${tank.tank.id}/dips`).send({ at: at(minute), level_m: 3 - distanceAt(minute) - SENSOR_SHORT_M });
      expect(res.status).toBe(201);
      dipIds.push(res.body.id);
    }
    const calibrated = await technician.post(`/api/channels/${tank.device.channels[0].id}/calibration`).send({ dip_ids: dipIds });
    expect(calibrated.status).toBe(201);
    // Until the worker runs, nothing has changed.
    expect((await items()).map((m) => m.distance_m)).toEqual(before.map((m) => m.distance_m));
    await runWorkerOnce({ WORKER_QUIET: "1" });

    const after = await items();
    expect(after).toHaveLength(61);
    after.forEach((m, i) => {
      expect(m.raw_distance_m).toBe(before[i].raw_distance_m);
      // Least squares through the two dips: scale 1, offset +2 cm (the echoes are rounded to 0.01 µs).
      expect(Math.abs(m.distance_m - before[i].distance_m - SENSOR_SHORT_M)).toBeLessThan(0.0001);
      expect(Math.abs(m.level_m - (before[i].level_m - SENSOR_SHORT_M))).toBeLessThan(0.0001);
      expect(Math.abs(m.volume_l - (before[i].volume_l - SENSOR_SHORT_M * 3000))).toBeLessThan(0.3);
    });
    const hourly = await admin.get(`/api/assets/${tank.tank.id}/series?bucket=1h&from=${encodeURIComponent(at(-60))}&to=${encodeURIComponent(at(120))}`).expect(200);
    const n = hourly.body.items.reduce((s: number, b: { n: number }) => s + b.n, 0);
    expect(n).toBe(61);
    const minLevel = Math.min(...hourly.body.items.map((b: { level_min_m: number }) => b.level_min_m));
    expect(Math.abs(minLevel - Math.min(...after.map((m) => m.level_m)))).toBeLessThan(1e-9);
    const [request] = await sql(`SELECT reason, done_at, error FROM recompute_requests WHERE channel_id = $1`, [tank.device.channels[0].id]);
    expect(request).toMatchObject({ reason: "calibration", error: null });
    expect(request.done_at).not.toBeNull();
  }, 240_000);

  it("gives the same rows when run twice", async () => {
    const first = { items: await items(), rollups: await rollups() };
    // Patching the mounting (to the same height) files another recompute of the tank's channels.
    expect((await admin.patch(`/api/assets/${tank.tank.id}`).send({ mount_height_m: 3 })).status).toBe(200);
    await runWorkerOnce({ WORKER_QUIET: "1" });
    expect(await items()).toEqual(first.items);
    expect(await rollups()).toEqual(first.rollups);
  }, 240_000);

  it("follows a new mount height", async () => {
    const before = await items();
    expect((await admin.patch(`/api/assets/${tank.tank.id}`).send({ mount_height_m: 3.1 })).status).toBe(200);
    await runWorkerOnce({ WORKER_QUIET: "1" });
    const after = await items();
    after.forEach((m, i) => {
      expect(m.distance_m).toBe(before[i].distance_m);
      expect(Math.abs(m.level_m - before[i].level_m - 0.1)).toBeLessThan(1e-9);
    });
  }, 240_000);
});
