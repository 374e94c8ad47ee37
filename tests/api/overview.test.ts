import { beforeAll, describe, expect, it } from "vitest";
import { anonymous, signedIn, signInAgent, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { createOtherOrganisation } from "../support/db";
import { runWorkerOnce } from "../support/worker";

// The live screens' routes (issue 6 items 1–3, 5): shape, values through the real pipeline, the
// device-health table's paging, sorting and filtering, roles and organisation scoping.

let admin: Agent;
let operator: Agent;
let fleet: Awaited<ReturnType<typeof createTankWithDevice>>;
let bayId: string;

beforeAll(async () => {
  admin = await signedIn("admin@halftrip.test");
  operator = await signedIn("operator@halftrip.test");
  fleet = await createTankWithDevice(admin, { channels: [0, 1] });
  const bay = await admin.post("/api/assets").send({ site_id: fleet.site.id, kind: "bay", name: `Bay ${Date.now()}`, floor_distance_m: 2.5, occupied_below_m: 1.9, bay_row: 2, bay_col: 3, bay_level: "Level 0" });
  expect(bay.status).toBe(201);
  bayId = bay.body.id;
  const patched = await admin.patch(`/api/devices/${fleet.device.id}`).send({ channels: [{ index: 0, asset_id: fleet.tank.id }, { index: 1, asset_id: bayId }] });
  expect(patched.status).toBe(200);
  // Readings a minute apart per channel, and 30 s between the two channels (no crosstalk).
  const start = Date.now() - 10 * 60_000;
  const readings = [];
  for (let i = 0; i < 4; i++) {
    readings.push({ seq: i + 1, at: new Date(start + i * 60_000).toISOString(), channel: 0, echo_us: 5831, air_temp_c: 20, battery_v: 3.7, rssi_dbm: -80 });
    // The bay: floor twice, then a car (roof nearer than occupied_below_m) twice.
    readings.push({ seq: i + 1, at: new Date(start + i * 60_000 + 30_000).toISOString(), channel: 1, echo_us: i < 2 ? 14_570 : 5831, air_temp_c: 20 });
  }
  const sent = await anonymous().post("/api/v1/readings").set("Authorization", `Bearer ${fleet.apiKey}`).send({ readings });
  expect(sent.status).toBe(202);
  expect(sent.body.accepted).toBe(8);
  await runWorkerOnce();
}, 180_000);

describe("GET /api/overview", () => {
  it("lists every site with its tanks, bays, alarms by priority and devices offline", async () => {
    const res = await operator.get("/api/overview").expect(200);
    expect(res.body.totals).toMatchObject({ sites: expect.any(Number), tanks: expect.any(Number), devices_offline: expect.any(Number) });
    expect(Object.keys(res.body.totals.alarms).sort()).toEqual(["critical", "high", "low", "medium"]);
    const site = res.body.sites.find((s: { id: string }) => s.id === fleet.site.id);
    expect(site).toBeDefined();
    expect(site.devices).toEqual({ total: 1, offline: expect.any(Number) });
    expect(site.bays).toMatchObject({ total: 1 });
    expect(site.tanks).toHaveLength(1);
    expect(site.tanks[0]).toMatchObject({ id: fleet.tank.id, capacity_l: 8400, reorder_pct: 25 });
  });

  it("sends a large site's emptiest tanks only, with the count of all of them", async () => {
    const site = (await admin.post("/api/sites").send({ name: `Tank farm ${Date.now()}`, time_zone: "UTC" }).expect(201)).body;
    const names = Array.from({ length: 13 }, (_, i) => `Farm tank ${String(i).padStart(2, "0")}`);
    for (const name of names) {
      await admin.post("/api/assets").send({ site_id: site.id, kind: "tank", name, mount_height_m: 2, geometry: { shape: "rectangular", length_m: 1, width_m: 1, height_m: 1.8 } }).expect(201);
    }
    const farm = (await operator.get("/api/overview").expect(200)).body.sites.find((s: { id: string }) => s.id === site.id);
    expect(farm.tank_count).toBe(13);
    // None has a level yet: unknown fills come first, then by name.
    expect(farm.tanks.map((t: { name: string }) => t.name)).toEqual(names.slice(0, 12));
  });

  it("shows the tank's level, fill and volume from the readings", async () => {
    const site = (await operator.get("/api/overview").expect(200)).body.sites.find((s: { id: string }) => s.id === fleet.site.id);
    const tank = site.tanks[0];
    // REFERENCES.md §2 [computed]: 5 831 µs at 20 °C → 1.00064 m; the sensor is 3 m above the bottom, so the
    // level is 1.99936 m; a 2 m × 1.5 m rectangular tank holds V = l·w·h = 5 998.08 L, 71.41 % of 8 400 L.
    expect(tank.level_m).toBeCloseTo(1.99936, 4);
    expect(tank.volume_l).toBeCloseTo(5998.08, 0);
    expect(tank.fill_pct).toBeCloseTo(71.406, 2);
    expect(tank.uncertainty_m).toBeGreaterThan(0);
    expect(new Date(tank.at).getTime()).toBeLessThanOrEqual(Date.now());
  });
});

describe("GET /api/sites/{id}/overview", () => {
  it("gives the site's tanks with the day's trend, its bays where they stand, and its alarms", async () => {
    const res = await operator.get(`/api/sites/${fleet.site.id}/overview`).expect(200);
    expect(res.body.site).toMatchObject({ id: fleet.site.id, name: fleet.site.name, time_zone: "Europe/Dublin" });
    expect(res.body.tanks.map((t: { id: string }) => t.id)).toEqual([fleet.tank.id]);
    expect(res.body.bays.map((b: { id: string }) => b.id)).toEqual([bayId]);
    expect(res.body.bays[0].bay).toEqual({ row: 2, col: 3, level: "Level 0" });
    expect(Array.isArray(res.body.alarms)).toBe(true);
    const tank = res.body.tanks[0];
    expect(tank).toHaveProperty("setpoints");
    expect(tank.day).toHaveProperty("trend");
    expect(tank.tank_height_m).toBe(2.8);
    expect(tank.day.trend.length).toBeGreaterThan(0);
    expect(tank.day.range[0]).toBeCloseTo(1.99936, 4);
    expect(tank.channel).toMatchObject({ device_id: fleet.device.id, expected_interval_s: 60 });
  });

  it("shows the bay occupied since the first of the readings that agreed", async () => {
    const bay = (await operator.get(`/api/sites/${fleet.site.id}/overview`).expect(200)).body.bays[0];
    // 14 570 µs at 20 °C is 2.5003 m (the floor; 343.215 m/s × 14 570 µs / 2, by hand), 5 831 µs is 1.00064 m (REFERENCES.md §2),
    // nearer than occupied_below_m = 1.9 m: the bay is occupied from the third reading on (two agreeing readings).
    expect(bay.occupancy.occupied).toBe(true);
    expect(bay.latest.occupied).toBe(true);
    expect(bay.latest.distance_m).toBeCloseTo(1.00064, 4);
  });
});

describe("GET /api/assets/{id}/overview", () => {
  it("gives the asset, its channels, state, setpoints, flags, alarms, history, dips and calibrations", async () => {
    const res = await operator.get(`/api/assets/${fleet.tank.id}/overview`).expect(200);
    expect(res.body.asset).toMatchObject({ id: fleet.tank.id, kind: "tank", site_name: fleet.site.name });
    expect(res.body.channels).toEqual([expect.objectContaining({ device_id: fleet.device.id, index: 0, calibration_scale: 1, device_profile: "echo" })]);
    for (const key of ["setpoints", "flags", "alarms", "alarm_history", "dips", "calibrations"]) expect(Array.isArray(res.body[key])).toBe(true);
    expect(new Date(res.body.period.to).getTime() - new Date(res.body.period.from).getTime()).toBe(30 * 86_400_000);
  });

  it("takes the period from the query and refuses one that ends before it starts", async () => {
    const from = "2026-01-01T00:00:00.000Z";
    const to = "2026-01-08T00:00:00.000Z";
    const ok = await operator.get(`/api/assets/${fleet.tank.id}/overview?from=${from}&to=${to}`).expect(200);
    expect(ok.body.period).toEqual({ from, to });
    const bad = await operator.get(`/api/assets/${fleet.tank.id}/overview?from=${to}&to=${from}`);
    expect(bad.status).toBe(422);
    expect(bad.body.fields.to).toMatch(/after/);
    expect((await operator.get(`/api/assets/${fleet.tank.id}/overview?from=yesterday`)).status).toBe(422);
    expect((await operator.get(`/api/assets/${fleet.tank.id}/overview?from=2020-01-01T00:00:00Z&to=2026-01-01T00:00:00Z`)).status).toBe(422);
  });
});

describe("GET /api/device-health", () => {
  it("finds a device by serial, with its channels and their flags", async () => {
    const res = await operator.get(`/api/device-health?q=${encodeURIComponent(fleet.device.serial)}`).expect(200);
    expect(res.body).toMatchObject({ total: 1, page: 1, page_size: 25, sort: "name", dir: "asc" });
    const row = res.body.items[0];
    expect(row).toMatchObject({ id: fleet.device.id, serial: fleet.device.serial, site_name: fleet.site.name });
    expect(row.channels.map((c: { index: number; asset_id: string }) => [c.index, c.asset_id])).toEqual([[0, fleet.tank.id], [1, bayId]]);
    expect(row).toMatchObject({ battery_v: 3.7, rssi_dbm: -80, offline: false });
  });

  it("pages without overlap and sorts both ways", async () => {
    const extra = await createTankWithDevice(admin);
    const all = (await operator.get("/api/device-health?page_size=200&sort=name").expect(200)).body;
    expect(all.total).toBeGreaterThanOrEqual(2);
    const names = all.items.map((d: { name: string }) => d.name.toLowerCase());
    expect(names).toEqual([...names].sort((a, b) => (a < b ? -1 : a > b ? 1 : 0)));
    const desc = (await operator.get("/api/device-health?page_size=200&sort=name&dir=desc").expect(200)).body.items.map((d: { id: string }) => d.id);
    expect(desc).toEqual([...all.items.map((d: { id: string }) => d.id)].reverse());
    const p1 = (await operator.get("/api/device-health?page_size=1&page=1").expect(200)).body;
    const p2 = (await operator.get("/api/device-health?page_size=1&page=2").expect(200)).body;
    expect(p1.items).toHaveLength(1);
    expect(p2.items[0].id).not.toBe(p1.items[0].id);
    expect(p2.total).toBe(p1.total);
    const past = (await operator.get(`/api/device-health?page_size=1&page=${p1.total + 1}`).expect(200)).body;
    expect(past).toMatchObject({ items: [], total: p1.total });
    expect(extra.device.id).toBeDefined();
  });

  it("filters by site and by state", async () => {
    const mine = (await operator.get(`/api/device-health?site_id=${fleet.site.id}`).expect(200)).body;
    expect(mine.items.map((d: { id: string }) => d.id)).toEqual([fleet.device.id]);
    const never = await createTankWithDevice(admin);
    const offline = (await operator.get(`/api/device-health?site_id=${never.site.id}&state=offline`).expect(200)).body;
    expect(offline.items.map((d: { id: string }) => d.id)).toEqual([never.device.id]);
    const healthy = (await operator.get(`/api/device-health?site_id=${never.site.id}&state=healthy`).expect(200)).body;
    expect(healthy.total).toBe(0);
  });

  it("explains a bad sort, page size or flag", async () => {
    for (const q of ["sort=colour", "page_size=1000", "flag=rusty", "page=0", "dir=sideways"]) {
      const res = await operator.get(`/api/device-health?${q}`);
      expect(res.status, q).toBe(422);
      expect(res.body.error).toBe("invalid");
    }
  });
});

describe("roles and organisations", () => {
  it("lets a viewer read every live route", async () => {
    const viewer = await signedIn("viewer@halftrip.test");
    for (const p of ["/api/overview", `/api/sites/${fleet.site.id}/overview`, `/api/assets/${fleet.tank.id}/overview`, "/api/device-health"]) {
      expect((await viewer.get(p)).status, p).toBe(200);
    }
  });

  it("answers 401 without a session", async () => {
    for (const p of ["/api/overview", `/api/sites/${fleet.site.id}/overview`, `/api/assets/${fleet.tank.id}/overview`, "/api/device-health"]) {
      expect((await anonymous().get(p)).status, p).toBe(401);
    }
  });

  it("answers 404 for another organisation's site or asset, and for ids that are not ids", async () => {
    const other = await createOtherOrganisation();
    const { agent } = await signInAgent(other.adminEmail, other.password);
    expect((await agent.get(`/api/sites/${fleet.site.id}/overview`)).status).toBe(404);
    expect((await agent.get(`/api/assets/${fleet.tank.id}/overview`)).status).toBe(404);
    expect((await operator.get("/api/sites/not-a-uuid/overview")).status).toBe(404);
    expect((await operator.get("/api/assets/00000000-0000-4000-8000-000000000000/overview")).status).toBe(404);
  });

  it("shows another organisation none of our sites or devices", async () => {
    const other = await createOtherOrganisation();
    const { agent } = await signInAgent(other.adminEmail, other.password);
    const overview = (await agent.get("/api/overview").expect(200)).body;
    expect(overview.sites).toEqual([]);
    expect(overview.totals.devices).toBe(0);
    const health = (await agent.get(`/api/device-health?q=${encodeURIComponent(fleet.device.serial)}`).expect(200)).body;
    expect(health.total).toBe(0);
    const bySite = (await agent.get(`/api/device-health?site_id=${fleet.site.id}`).expect(200)).body;
    expect(bySite.items).toEqual([]);
  });
});
