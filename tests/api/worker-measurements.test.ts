import { beforeAll, describe, expect, it } from "vitest";
import { anonymous, signedIn, signInAgent, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { createOtherOrganisation, sql } from "../support/db";
import { runWorkerOnce } from "../support/worker";
import { createAsset, createDevice, createSite, practicalSpeed, sendReadings, type CreatedDevice } from "./worker-support";

// Readings sent through the device API, turned into measurements by `worker --once`, read back
// through GET /api/channels/{id}/measurements and GET /api/assets/{id}/series (issue 4).
//
// The test tank of tests/support/fleet.ts: sensor face 3 m above the bottom, rectangular 2 m × 1.5 m
// × 2.8 m, so level = 3 − distance, volume = 3000 L per metre of level and capacity 8400 L.
const MOUNT_M = 3;
const LITRES_PER_M = 2 * 1.5 * 1000;
const CAPACITY_L = 2 * 1.5 * 2.8 * 1000;

const T0 = Date.now() - 60 * 60_000;
const at = (minute: number, ms = 0) => new Date(T0 + minute * 60_000 + ms).toISOString();

type Item = Record<string, unknown> & { at: string; status: string };

async function measurementsOf(agent: Agent, channelId: string, query = "order=asc&limit=1000"): Promise<Item[]> {
  const res = await agent.get(`/api/channels/${channelId}/measurements?${query}`);
  if (res.status !== 200) throw new Error(`measurements: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body.items;
}

/** |actual − expected| ≤ tolerance, for numbers that may come back null. */
function near(actual: unknown, expected: number, tolerance: number) {
  expect(typeof actual).toBe("number");
  expect(Math.abs((actual as number) - expected)).toBeLessThanOrEqual(tolerance);
}

let admin: Agent;
let viewer: Agent;
let echoTank: Awaited<ReturnType<typeof createTankWithDevice>>;
let capture8: Awaited<ReturnType<typeof createTankWithDevice>>;
let capture1: Awaited<ReturnType<typeof createTankWithDevice>>;
let fallbacks: Awaited<ReturnType<typeof createTankWithDevice>>;
let duty: Awaited<ReturnType<typeof createTankWithDevice>>;
let pulse: Awaited<ReturnType<typeof createTankWithDevice>>;
let interpolated: { site: { id: string }; tank: { id: string }; device: CreatedDevice };

beforeAll(async () => {
  [admin, viewer] = await Promise.all([signedIn("admin@halftrip.test"), signedIn("viewer@halftrip.test")]);
  [echoTank, capture8, capture1, fallbacks, duty, pulse] = await Promise.all([
    createTankWithDevice(admin),
    createTankWithDevice(admin, { profile: "capture", device: { clock_hz: 16_000_000, prescaler: 8, timer_bits: 16 } }),
    createTankWithDevice(admin, { profile: "capture", device: { clock_hz: 16_000_000, prescaler: 1, timer_bits: 16 } }),
    createTankWithDevice(admin),
    createTankWithDevice(admin, { profile: "duty_coded", device: { zero_m: 0.2, span_m: 5 } }),
    createTankWithDevice(admin, { profile: "pulse_coded", device: { us_per_mm: 1 } }),
  ]);
  // A site whose temperature comes from its own temperature channel (channel 1 of the device).
  const site = await createSite(admin);
  const tank = await createAsset(admin, site.id, { kind: "tank", mount_height_m: MOUNT_M, geometry: { shape: "rectangular", length_m: 2, width_m: 1.5, height_m: 2.8 } });
  const device = await createDevice(admin, site.id, { channels: [{ index: 0, asset_id: tank.id }, { index: 1 }] });
  const temperatureChannel = device.channels.find((c) => c.index === 1)!;
  expect((await admin.patch(`/api/sites/${site.id}`).send({ temperature_channel_id: temperatureChannel.id })).status).toBe(200);
  interpolated = { site, tank, device };

  await Promise.all([
    // REFERENCES.md §2 rows, each with the reading's own air temperature.
    sendReadings(echoTank.apiKey, [
      { seq: 1, at: at(0), channel: 0, echo_us: 5831, air_temp_c: 20 },
      { seq: 2, at: at(1), channel: 0, echo_us: 11662, air_temp_c: 20 },
      { seq: 3, at: at(2), channel: 0, echo_us: 2915.5, air_temp_c: 0 },
    ]),
    // 16 MHz / 8 = 0.5 µs a tick: 11 662 ticks are 5 831 µs (REFERENCES.md §2).
    sendReadings(capture8.apiKey, [{ seq: 1, at: at(0), channel: 0, ticks: 11662, overflows: 0, air_temp_c: 20 }]),
    // 16 MHz / 1 = 0.0625 µs a tick: 1 overflow of 2^16 plus 27 760 ticks are 93 296 ticks = 5 831 µs.
    sendReadings(capture1.apiKey, [{ seq: 1, at: at(0), channel: 0, ticks: 27760, overflows: 1, air_temp_c: 20 }]),
    sendReadings(fallbacks.apiKey, [
      { seq: 1, at: at(0), channel: 0, samples_us: [5830, 5832, 6410, 5829, 5831], air_temp_c: 20 },
      { seq: 2, at: at(1), channel: 0, echo_us: 5831 },
      { seq: 3, at: at(2), channel: 0, echo_us: 37000, air_temp_c: 20 },
      { seq: 4, at: at(3), channel: 0, echo_us: 100, air_temp_c: 20 },
      { seq: 5, at: at(4), channel: 0, echo_us: 17500, air_temp_c: 35 },
    ]),
    sendReadings(duty.apiKey, [
      { seq: 1, at: at(0), channel: 0, high_us: 412, period_us: 1000 },
      { seq: 2, at: at(1), channel: 0, high_us: 0, period_us: 1000 },
    ]),
    sendReadings(pulse.apiKey, [{ seq: 1, at: at(0), channel: 0, pulse_us: 1500 }]),
    // Temperature channel at 10 °C and 20 °C ten minutes apart; the tank reading halfway has none of its own.
    sendReadings(device.apiKey, [
      { seq: 1, at: at(0), channel: 1, echo_us: 1000, air_temp_c: 10 },
      { seq: 2, at: at(10), channel: 1, echo_us: 1000, air_temp_c: 20 },
      { seq: 3, at: at(5), channel: 0, echo_us: 5831 },
    ]),
  ]);
  await runWorkerOnce({ WORKER_QUIET: "1" });
}, 240_000);

describe("measurements from the device API through the worker", () => {
  it("turns echo times into distances, levels and volumes (REFERENCES.md §1–§3)", async () => {
    const items = await measurementsOf(viewer, echoTank.device.channels[0].id);
    expect(items.map((m) => m.status)).toEqual(["ok", "ok", "ok"]);
    // REFERENCES.md §2 [computed]: 5 831 µs at 20 °C → 1.00064 m; 11 662 µs at 20 °C → 2.00128 m; 2 915.5 µs at 0 °C → 0.48295 m.
    const expected = [
      { distance: 1.00064, speed: 343.215, temp: 20 },
      { distance: 2.00128, speed: 343.215, temp: 20 },
      { distance: 0.48295, speed: 331.3, temp: 0 },
    ];
    items.forEach((m, i) => {
      near(m.distance_m, expected[i].distance, 0.00001);
      // REFERENCES.md §1 table, 331.3·√(1 + T/273.15) to three decimals.
      near(m.speed_of_sound_ms, expected[i].speed, 0.0005);
      expect(m.air_temp_c).toBe(expected[i].temp);
      expect(m.temp_source).toBe("reading");
      // Level from the mount height; a rectangular tank holds length·width·level (REFERENCES.md §3 geometry, by hand).
      const level = MOUNT_M - expected[i].distance;
      near(m.level_m, level, 0.00001);
      near(m.volume_l, level * LITRES_PER_M, 0.05);
      near(m.fill_pct, (100 * level * LITRES_PER_M) / CAPACITY_L, 0.001);
      near(m.ullage_l, CAPACITY_L - level * LITRES_PER_M, 0.05);
      expect(m.uncertainty_m as number).toBeGreaterThan(0);
      expect(m.occupied).toBeNull();
    });
    expect(items[0].tof_us).toBe(5831);
  });

  it("counts timer captures with the device's clock, prescaler and the 16-bit wrap (REFERENCES.md §2)", async () => {
    for (const device of [capture8, capture1]) {
      const [m] = await measurementsOf(admin, device.device.channels[0].id);
      expect(m.status).toBe("ok");
      near(m.tof_us, 5831, 1e-9);
      near(m.distance_m, 1.00064, 0.00001);
    }
  });

  it("falls back for temperature, takes a burst's median, and says why a reading is not a level", async () => {
    const items = await measurementsOf(admin, fallbacks.device.channels[0].id);
    expect(items.map((m) => m.status)).toEqual(["ok", "ok", "no_echo", "too_close", "out_of_bounds"]);
    const [burst, noTemperature, timeout, tooClose, beyond] = items;
    // The burst's median is 5 831 µs whatever the stray 6 410 µs echo (PRODUCT.md burst rule).
    expect(burst.tof_us).toBe(5831);
    near(burst.distance_m, 1.00064, 0.00001);
    // No reading temperature, no site samples, no fixed site value: 20 °C (PRODUCT.md precedence).
    expect(noTemperature).toMatchObject({ temp_source: "default", air_temp_c: 20 });
    near(noTemperature.distance_m, 1.00064, 0.00001);
    // A default temperature is less certain than a measured one.
    expect(noTemperature.uncertainty_m as number).toBeGreaterThan(burst.uncertainty_m as number);
    // 37 ms is the module's "no echo" pulse (REFERENCES.md §2, common practice).
    expect(timeout).toMatchObject({ distance_m: null, level_m: null, volume_l: null });
    // 100 µs at 20 °C is 1.7 cm, inside the channel's 2 cm blanking distance.
    near(tooClose.distance_m, (practicalSpeed(20) * 100e-6) / 2, 1e-9);
    expect(tooClose.level_m).toBeNull();
    // 17 500 µs at 35 °C → 3.07900 m (REFERENCES.md §2), below the bottom of a tank whose sensor is 3 m up.
    near(beyond.distance_m, 3.079, 0.00001);
    near(beyond.level_m, MOUNT_M - 3.079, 0.00001);
    expect(beyond.volume_l).toBeNull();
    for (const m of items) expect(typeof m.status_detail === "string" || m.status === "ok").toBe(true);
  });

  it("uses the site's fixed temperature when the reading has none", async () => {
    expect((await admin.patch(`/api/sites/${fallbacks.site.id}`).send({ air_temp_c: 10 })).status).toBe(200);
    await sendReadings(fallbacks.apiKey, [{ seq: 6, at: at(5), channel: 0, echo_us: 5831 }]);
    await runWorkerOnce({ WORKER_QUIET: "1" });
    const items = await measurementsOf(admin, fallbacks.device.channels[0].id);
    const m = items[items.length - 1];
    expect(m).toMatchObject({ status: "ok", temp_source: "site_fixed", air_temp_c: 10 });
    // REFERENCES.md §1: 337.310 m/s at 10 °C, so 5 831 µs is 337.310 · 5831e-6 / 2 m.
    near(m.speed_of_sound_ms, 337.31, 0.0005);
    near(m.distance_m, (337.31 * 5831e-6) / 2, 0.00001);
  }, 240_000);

  it("interpolates the site's temperature channel in time", async () => {
    const [m] = await measurementsOf(admin, interpolated.device.channels.find((c) => c.index === 0)!.id);
    // Halfway between 10 °C and 20 °C.
    expect(m).toMatchObject({ status: "ok", temp_source: "site_samples" });
    near(m.air_temp_c, 15, 1e-9);
    near(m.speed_of_sound_ms, practicalSpeed(15), 1e-9);
    near(m.distance_m, (practicalSpeed(15) * 5831e-6) / 2, 1e-9);
    const samples = await sql(`SELECT at, air_temp_c, source FROM temperature_samples WHERE site_id = $1 ORDER BY at`, [interpolated.site.id]);
    expect(samples.map((s) => [s.air_temp_c, s.source])).toEqual([[10, "channel"], [20, "channel"]]);
  });

  it("decodes pulse- and duty-coded distances, and marks an impossible duty cycle invalid_value", async () => {
    const [coded] = await measurementsOf(admin, pulse.device.channels[0].id);
    // 1 500 µs at 1 µs per mm is 1.5 m; no temperature applies (PRODUCT.md pulse_coded).
    expect(coded).toMatchObject({ status: "ok", tof_us: null, air_temp_c: null, speed_of_sound_ms: null });
    near(coded.distance_m, 1.5, 1e-12);
    const [dutyOk, dutyBad] = await measurementsOf(admin, duty.device.channels[0].id);
    // duty 412/1000, zero 0.2 m + 0.412 · 5 m span = 2.26 m (PRODUCT.md duty_coded).
    expect(dutyOk.status).toBe("ok");
    near(dutyOk.distance_m, 2.26, 1e-12);
    near(dutyOk.volume_l, (MOUNT_M - 2.26) * LITRES_PER_M, 1e-6);
    expect(dutyBad).toMatchObject({ status: "invalid_value", distance_m: null });
    expect(dutyBad.status_detail).toMatch(/high time/);
  });

  it("keeps 5-minute and hourly rollups of the valid measurements", async () => {
    const res = await viewer.get(`/api/assets/${echoTank.tank.id}/series?bucket=5m&from=${encodeURIComponent(at(-5))}&to=${encodeURIComponent(at(30))}`).expect(200);
    expect(res.body.bucket).toBe("5m");
    const n = res.body.items.reduce((s: number, b: { n: number }) => s + b.n, 0);
    expect(n).toBe(3);
    const levels = [MOUNT_M - 1.00064, MOUNT_M - 2.00128, MOUNT_M - 0.48295];
    const all = res.body.items.flatMap((b: { level_min_m: number; level_max_m: number }) => [b.level_min_m, b.level_max_m]);
    near(Math.min(...all), Math.min(...levels), 0.00001);
    near(Math.max(...all), Math.max(...levels), 0.00001);
    const hourly = await viewer.get(`/api/assets/${fallbacks.tank.id}/series?bucket=1h&from=${encodeURIComponent(at(-60))}&to=${encodeURIComponent(at(60))}`).expect(200);
    const counted = hourly.body.items.reduce((s: { n: number; all: number }, b: { n: number; n_all: number }) => ({ n: s.n + b.n, all: s.all + b.n_all }), { n: 0, all: 0 });
    // Six readings, three of them valid; the rest are counted but not averaged.
    expect(counted).toEqual({ n: 3, all: 6 });
  });
});

describe("the measurements and series API", () => {
  it("answers 404 for another organisation's channel or asset and for ids that are not ids", async () => {
    const other = await createOtherOrganisation();
    const { agent } = await signInAgent(other.adminEmail, other.password);
    await agent.get(`/api/channels/${echoTank.device.channels[0].id}/measurements`).expect(404);
    await agent.get(`/api/assets/${echoTank.tank.id}/series`).expect(404);
    await agent.get(`/api/channels/${echoTank.device.channels[0].id}/health`).expect(404);
    await admin.get(`/api/channels/not-a-uuid/measurements`).expect(404);
  });

  it("needs a signed-in user", async () => {
    await anonymous().get(`/api/channels/${echoTank.device.channels[0].id}/measurements`).expect(401);
    await anonymous().get(`/api/assets/${echoTank.tank.id}/series`).expect(401);
  });

  it("validates the query", async () => {
    const channel = echoTank.device.channels[0].id;
    const bad = [
      `/api/channels/${channel}/measurements?from=${encodeURIComponent(at(10))}&to=${encodeURIComponent(at(0))}`,
      `/api/channels/${channel}/measurements?limit=0`,
      `/api/channels/${channel}/measurements?limit=10001`,
      `/api/channels/${channel}/measurements?from=yesterday`,
      `/api/assets/${echoTank.tank.id}/series?bucket=10m`,
      `/api/assets/${echoTank.tank.id}/series?bucket=5m&from=2026-01-01T00:00:00Z&to=2026-03-01T00:00:00Z`,
    ];
    for (const url of bad) {
      const res = await admin.get(url);
      expect(res.status, url).toBe(422);
      expect(res.body.error).toBe("invalid");
    }
  });

  it("pages with limit and order", async () => {
    const channel = echoTank.device.channels[0].id;
    const newest = await measurementsOf(admin, channel, "limit=1");
    expect(newest).toHaveLength(1);
    expect(newest[0].tof_us).toBe(2915.5);
    const oldest = await measurementsOf(admin, channel, "limit=1&order=asc");
    expect(oldest[0].tof_us).toBe(5831);
  });
});
