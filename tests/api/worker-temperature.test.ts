import { beforeAll, describe, expect, it } from "vitest";
import { signedIn, type Agent } from "../support/session";
import { sql } from "../support/db";
import { runWorkerOnce } from "../support/worker";
import { createAsset, createDevice, createSite, practicalSpeed, sendReadings, type CreatedDevice } from "./worker-support";

// When the worker recomputes because of the air temperature (PRODUCT.md "Measurement (the worker)":
// the reading's own value, then the site's samples interpolated in time, then the site's fixed value,
// then 20 °C): a change of the site's fixed temperature, and temperature samples that arrive after the
// site's other channels were measured. Distances are checked against REFERENCES.md §1's practical
// formula (practicalSpeed) and d = c·t/2 (REFERENCES.md §2).

const ECHO_US = 5831;
const distanceAt = (tempC: number) => (practicalSpeed(tempC) * ECHO_US * 1e-6) / 2;
const GEOMETRY = { shape: "rectangular", length_m: 2, width_m: 1.5, height_m: 2.8 };

type Item = { at: string; status: string; air_temp_c: number; temp_source: string; distance_m: number };

let admin: Agent;

async function measurementsOf(channelId: string): Promise<Item[]> {
  const res = await admin.get(`/api/channels/${channelId}/measurements?order=asc&limit=1000`).expect(200);
  return res.body.items;
}

async function requestsOf(channelId: string): Promise<{ id: string; reason: string; done_at: Date | null; error: string | null }[]> {
  return sql(`SELECT id, reason, done_at, error FROM recompute_requests WHERE channel_id = $1 ORDER BY id`, [channelId]);
}

async function tankAtSite(site: { id: string }, channels: Record<string, unknown>[] = []): Promise<CreatedDevice> {
  const tank = await createAsset(admin, site.id, { kind: "tank", mount_height_m: 3, geometry: GEOMETRY });
  return createDevice(admin, site.id, { channels: [{ index: 0, asset_id: tank.id }, ...channels] });
}

beforeAll(async () => {
  admin = await signedIn("admin@halftrip.test");
});

describe("a change of the site's fixed temperature", () => {
  const T0 = Date.now() - 30 * 60_000;
  const at = (minute: number) => new Date(T0 + minute * 60_000).toISOString();
  let site: { id: string };
  let device: CreatedDevice;
  let channelId: string;

  beforeAll(async () => {
    site = await createSite(admin, { air_temp_c: 5 });
    device = await tankAtSite(site);
    channelId = device.channels[0].id;
    await sendReadings(device.apiKey, Array.from({ length: 5 }, (_, k) => ({ seq: k + 1, at: at(k), channel: 0, echo_us: ECHO_US })));
    await runWorkerOnce({ WORKER_QUIET: "1" });
  }, 240_000);

  it("recomputes the site's channels with the new temperature", async () => {
    const before = await measurementsOf(channelId);
    expect(before).toHaveLength(5);
    for (const m of before) {
      expect(m).toMatchObject({ status: "ok", temp_source: "site_fixed", air_temp_c: 5 });
      expect(Math.abs(m.distance_m - distanceAt(5))).toBeLessThan(1e-9);
    }
    expect(await requestsOf(channelId)).toEqual([]);

    const res = await admin.patch(`/api/sites/${site.id}`).send({ air_temp_c: 25 });
    expect(res.status).toBe(200);
    const [request] = await requestsOf(channelId);
    expect(request).toMatchObject({ reason: "site air_temp_c changed", done_at: null });
    // The request is filed with the audit row of the update.
    const audit = await admin.get(`/api/audit?entity_id=${site.id}`).expect(200);
    const update = audit.body.items.find((a: { action: string }) => a.action === "site.update");
    expect(update.details).toMatchObject({ air_temp_c: 25, recompute_request_ids: [Number(request.id)] });

    await runWorkerOnce({ WORKER_QUIET: "1" });
    const after = await measurementsOf(channelId);
    expect(after.map((m) => m.at)).toEqual(before.map((m) => m.at));
    for (const m of after) {
      expect(m).toMatchObject({ status: "ok", temp_source: "site_fixed", air_temp_c: 25 });
      expect(Math.abs(m.distance_m - distanceAt(25))).toBeLessThan(1e-9);
    }
    // 5 °C to 25 °C is 3.5 % on the speed of sound: about 3.5 cm on a metre (REFERENCES.md §1).
    expect(after[0].distance_m - before[0].distance_m).toBeGreaterThan(0.03);
    const [done] = await requestsOf(channelId);
    expect(done.done_at).not.toBeNull();
    expect(done.error).toBeNull();
  }, 240_000);

  it("files nothing when no temperature field changes", async () => {
    const filed = (await requestsOf(channelId)).length;
    expect((await admin.patch(`/api/sites/${site.id}`).send({ name: `Renamed site ${Date.now()}` })).status).toBe(200);
    // The same value again is no change either.
    expect((await admin.patch(`/api/sites/${site.id}`).send({ air_temp_c: 25, humidity_pct: null })).status).toBe(200);
    expect(await requestsOf(channelId)).toHaveLength(filed);
  });

  it("files one request per channel with an asset when the humidity changes", async () => {
    // A second unit at the site with one tank channel and one unassigned channel.
    const other = await tankAtSite(site, [{ index: 1 }]);
    expect((await admin.patch(`/api/sites/${site.id}`).send({ humidity_pct: 60 })).status).toBe(200);
    const pending = await sql(
      `SELECT channel_id FROM recompute_requests WHERE reason = 'site humidity_pct changed' AND channel_id = ANY($1::uuid[]) ORDER BY channel_id`,
      [[channelId, ...other.channels.map((c) => c.id)]],
    );
    expect(pending.map((r) => r.channel_id)).toEqual([channelId, other.channels.find((c) => c.index === 0)!.id].sort());
    await runWorkerOnce({ WORKER_QUIET: "1" });
  }, 240_000);
});

describe("temperature samples that arrive late", () => {
  // The site's fixed 30 °C is what the tank falls back to while its temperature channel is silent.
  const FIXED_C = 30;
  const T0 = Date.now() - 3 * 3600_000;
  const at = (minute: number) => new Date(T0 + minute * 60_000).toISOString();
  // The temperature channel (channel 1 of the tank's unit, pinged 100 ms after channel 0) reports
  // every 5 minutes from minute 0 to 60; the tank reads every minute of that hour, once 50 minutes
  // before it (the nearest sample lies within tempNearestMaxS, 1 h) and once 90 minutes before it (no
  // sample within reach: it keeps the fixed value).
  const OFFSET_MS = 100;
  const sampleMinutes = Array.from({ length: 13 }, (_, k) => 5 * k);
  const sampleMs = (minute: number) => minute * 60_000 + OFFSET_MS;
  const tempAt = (minute: number) => 8 + minute / 10;
  const tankMinutes = [-90, -50, ...Array.from({ length: 61 }, (_, k) => k)];
  /**
   * The precedence of PRODUCT.md written out for this layout: linear interpolation between the samples
   * either side (5 minutes apart, well inside tempInterpolationMaxGapS), else the nearest sample within
   * tempNearestMaxS, else the site's fixed value.
   */
  const expectedTemp = (minute: number): { tempC: number; source: string } => {
    const t = minute * 60_000;
    const after = sampleMinutes.find((s) => sampleMs(s) >= t);
    const before = [...sampleMinutes].reverse().find((s) => sampleMs(s) < t);
    if (after !== undefined && before !== undefined) {
      return { tempC: tempAt(before) + ((t - sampleMs(before)) / (sampleMs(after) - sampleMs(before))) * (tempAt(after) - tempAt(before)), source: "site_samples" };
    }
    if (after !== undefined && sampleMs(after) - t <= 3600_000) return { tempC: tempAt(after), source: "site_samples" };
    return { tempC: FIXED_C, source: "site_fixed" };
  };

  let site: { id: string };
  let device: CreatedDevice;
  let tankChannel: string;
  const lateRequests = async () => (await requestsOf(tankChannel)).filter((r) => r.reason === "late temperature samples");

  beforeAll(async () => {
    site = await createSite(admin, { air_temp_c: FIXED_C });
    device = await tankAtSite(site, [{ index: 1 }]);
    tankChannel = device.channels.find((c) => c.index === 0)!.id;
    const temperatureChannel = device.channels.find((c) => c.index === 1)!.id;
    expect((await admin.patch(`/api/sites/${site.id}`).send({ temperature_channel_id: temperatureChannel })).status).toBe(200);
    await sendReadings(device.apiKey, tankMinutes.map((minute, k) => ({ seq: k + 1, at: at(minute), channel: 0, echo_us: ECHO_US })));
    await runWorkerOnce({ WORKER_QUIET: "1" });
  }, 240_000);

  it("measures the tank with the fixed value while there are no samples", async () => {
    const items = await measurementsOf(tankChannel);
    expect(items).toHaveLength(tankMinutes.length);
    for (const m of items) {
      expect(m).toMatchObject({ status: "ok", temp_source: "site_fixed", air_temp_c: FIXED_C });
      expect(Math.abs(m.distance_m - distanceAt(FIXED_C))).toBeLessThan(1e-9);
    }
  });

  it("recomputes the tank once the samples of the same times arrive", async () => {
    await sendReadings(
      device.apiKey,
      sampleMinutes.map((minute, k) => ({ seq: k + 1, at: new Date(T0 + sampleMs(minute)).toISOString(), channel: 1, echo_us: 3000, air_temp_c: tempAt(minute) })),
    );
    await runWorkerOnce({ WORKER_QUIET: "1" });
    const [request, ...more] = await lateRequests();
    expect(more).toEqual([]);
    expect(request.done_at).not.toBeNull();
    expect(request.error).toBeNull();

    const items = await measurementsOf(tankChannel);
    expect(items).toHaveLength(tankMinutes.length);
    items.forEach((m, i) => {
      const expected = expectedTemp(tankMinutes[i]);
      expect(m.temp_source).toBe(expected.source);
      expect(Math.abs(m.air_temp_c - expected.tempC)).toBeLessThan(1e-9);
      expect(Math.abs(m.distance_m - distanceAt(expected.tempC))).toBeLessThan(1e-9);
    });
    // 50 minutes before the first sample takes it as the nearest; 90 minutes before is out of reach.
    expect(items[1]).toMatchObject({ temp_source: "site_samples", air_temp_c: tempAt(0) });
    expect(items[0]).toMatchObject({ temp_source: "site_fixed", air_temp_c: FIXED_C });
  }, 240_000);

  it("files nothing more once the tank uses the samples, also when the spans are checked again", async () => {
    const filed = (await requestsOf(tankChannel)).length;
    await runWorkerOnce({ WORKER_QUIET: "1" });
    expect(await requestsOf(tankChannel)).toHaveLength(filed);
    // The second, later check of the same spans (for other workers' batches in flight) finds nothing either.
    const spans = await sql(`UPDATE temperature_sample_spans SET checked_at = now() - interval '1 hour' WHERE site_id = $1 RETURNING id`, [site.id]);
    expect(spans.length).toBeGreaterThan(0);
    await runWorkerOnce({ WORKER_QUIET: "1" });
    expect(await requestsOf(tankChannel)).toHaveLength(filed);
    expect(await sql(`SELECT id FROM temperature_sample_spans WHERE site_id = $1`, [site.id])).toEqual([]);
  }, 240_000);
});
