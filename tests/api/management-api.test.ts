import { beforeAll, describe, expect, it } from "vitest";
import { anonymous, signedIn, signInAgent, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { createOtherOrganisation, sql } from "../support/db";

// PRODUCT.md "People and roles" and "Management API": the role table and organisation scoping.
let admin: Agent;
let fleet: Awaited<ReturnType<typeof createTankWithDevice>>;
beforeAll(async () => {
  admin = await signedIn("admin@halftrip.test");
  fleet = await createTankWithDevice(admin);
});

describe("role table", () => {
  it.each(["operator@halftrip.test", "technician@halftrip.test", "viewer@halftrip.test"])("lets %s read but not provision", async (email) => {
    const agent = await signedIn(email);
    expect((await agent.get("/api/sites")).status).toBe(200);
    expect((await agent.get(`/api/assets/${fleet.tank.id}`)).status).toBe(200);
    expect((await agent.get(`/api/devices/${fleet.device.id}`)).status).toBe(200);
    expect((await agent.post("/api/sites").send({ name: "Nope", time_zone: "UTC" })).status).toBe(403);
    expect((await agent.patch(`/api/sites/${fleet.site.id}`).send({ name: "Nope" })).status).toBe(403);
    expect((await agent.post("/api/assets").send({ site_id: fleet.site.id, kind: "point", name: "Nope" })).status).toBe(403);
    expect((await agent.patch(`/api/assets/${fleet.tank.id}`).send({ name: "Nope" })).status).toBe(403);
    expect((await agent.post("/api/devices").send({})).status).toBe(403);
    expect((await agent.patch(`/api/devices/${fleet.device.id}`).send({ name: "Nope" })).status).toBe(403);
    expect((await agent.post(`/api/devices/${fleet.device.id}/key`)).status).toBe(403);
    expect((await agent.delete(`/api/devices/${fleet.device.id}/key`)).status).toBe(403);
  });

  it("answers 401 to every management route without a session", async () => {
    for (const path of ["/api/sites", "/api/assets", "/api/devices", `/api/devices/${fleet.device.id}`]) {
      expect((await anonymous().get(path)).status).toBe(401);
    }
    expect((await anonymous().post(`/api/devices/${fleet.device.id}/key`)).status).toBe(401);
  });

  it("never returns key hashes, and the plain key only once", async () => {
    const res = await admin.get(`/api/devices/${fleet.device.id}`).expect(200);
    const text = JSON.stringify(res.body);
    expect(text).not.toContain("key_hash");
    expect(text).not.toContain(fleet.apiKey);
    expect(res.body.keys[0].prefix).toBe(fleet.apiKey.split("_")[1]);
    expect(JSON.stringify((await admin.get("/api/devices")).body)).not.toContain(fleet.apiKey);
  });

  it("writes an audit row for each change", async () => {
    await admin.patch(`/api/sites/${fleet.site.id}`).send({ air_temp_c: 12 }).expect(200);
    const audit = await admin.get(`/api/audit?entity_id=${fleet.site.id}`).expect(200);
    expect(audit.body.items.map((a: { action: string }) => a.action)).toEqual(expect.arrayContaining(["site.create", "site.update"]));
    const deviceAudit = await admin.get(`/api/audit?entity_id=${fleet.device.id}`).expect(200);
    expect(deviceAudit.body.items[0].details.key_prefix).toBeDefined();
  });
});

describe("validation", () => {
  it("explains a bad geometry field by field", async () => {
    const res = await admin.post("/api/assets").send({ site_id: fleet.site.id, kind: "tank", name: "Bad", mount_height_m: 3, geometry: { shape: "vertical_cylinder", diameter_m: -1, height_m: 2, bottom: "cone" } });
    expect(res.status).toBe(422);
    expect(Object.keys(res.body.fields)).toEqual(expect.arrayContaining(["geometry.diameter_m"]));
  });

  it("asks a capture device for its timer settings", async () => {
    const res = await admin.post("/api/devices").send({ site_id: fleet.site.id, serial: `X-${Date.now()}`, name: "x", profile: "capture", channels: [{ index: 0 }] });
    expect(res.status).toBe(422);
    expect(Object.keys(res.body.fields)).toEqual(expect.arrayContaining(["clock_hz", "prescaler", "timer_bits"]));
  });

  it("derives the capacity from the shape (computed: V = l·w·h = 2 × 1.5 × 2.8 m³ = 8 400 L)", async () => {
    expect(fleet.tank.capacity_l).toBeCloseTo(8400, 6);
  });

  it("shows a capture device's resolution and warns of tanks beyond the timer's wrap", async () => {
    // REFERENCES.md §2 [computed]: 16 MHz, prescaler 8 → 0.5 µs and 0.0858 mm a tick, 16-bit wrap every 32.768 ms (5.62 m).
    const made = await createTankWithDevice(admin, { profile: "capture", device: { clock_hz: 16_000_000, prescaler: 8, timer_bits: 16 } });
    const timing = (await admin.get(`/api/devices/${made.device.id}`).expect(200)).body.timing;
    expect(timing.tick_us).toBeCloseTo(0.5, 9);
    expect(timing.mm_per_tick).toBeCloseTo(0.0858, 4);
    expect(timing.wrap_us).toBeCloseTo(32768, 6);
    expect(timing.wrap_range_m).toBeCloseTo(5.62, 2);
    expect(timing.tanks_beyond_wrap).toEqual([]);
    const tall = await admin.post("/api/assets").send({ site_id: made.site.id, kind: "tank", name: "Tall silo", mount_height_m: 7, geometry: { shape: "vertical_cylinder", diameter_m: 3, height_m: 6.8, bottom: "flat" } });
    await admin.patch(`/api/devices/${made.device.id}`).send({ channels: [{ index: 0, asset_id: tall.body.id }] }).expect(200);
    const warned = (await admin.get(`/api/devices/${made.device.id}`).expect(200)).body.timing;
    expect(warned.tanks_beyond_wrap.map((t: { name: string }) => t.name)).toEqual(["Tall silo"]);
  });
});

describe("organisation scoping", () => {
  it("answers 404 for ids of another organisation and keeps each key to its own device", async () => {
    const other = await createOtherOrganisation();
    const { agent: otherAdmin, status } = await signInAgent(other.adminEmail, other.password);
    expect(status).toBe(200);
    for (const path of [`/api/sites/${fleet.site.id}`, `/api/assets/${fleet.tank.id}`, `/api/devices/${fleet.device.id}`]) {
      expect((await otherAdmin.get(path)).status).toBe(404);
      expect((await otherAdmin.patch(path).send({ name: "taken over" })).status).toBe(404);
    }
    expect((await otherAdmin.post(`/api/devices/${fleet.device.id}/key`)).status).toBe(404);
    expect((await otherAdmin.delete(`/api/devices/${fleet.device.id}/key`)).status).toBe(404);
    expect((await otherAdmin.get("/api/sites")).body.items).toEqual([]);
    const crossAsset = await otherAdmin.post("/api/assets").send({ site_id: fleet.site.id, kind: "point", name: "sneaky" });
    expect(crossAsset.status).toBe(422);

    const theirs = await createTankWithDevice(otherAdmin);
    const crossChannel = await otherAdmin.patch(`/api/devices/${theirs.device.id}`).send({ channels: [{ index: 0, asset_id: fleet.tank.id }] });
    expect(crossChannel.status).toBe(422);
    const res = await anonymous().post("/api/v1/readings").set("Authorization", `Bearer ${theirs.apiKey}`).set("Content-Type", "application/json").send({ readings: [{ seq: 1, channel: 0, echo_us: 5831 }] });
    expect(res.status).toBe(202);
    const rows = await sql(`SELECT device_id FROM readings WHERE device_id IN ($1, $2)`, [theirs.device.id, fleet.device.id]);
    expect(rows.map((r) => r.device_id)).toEqual([theirs.device.id]);
    expect((await admin.get(`/api/devices/${theirs.device.id}`)).status).toBe(404);
  });

  it("answers 404 for ids that are not ids", async () => {
    expect((await admin.get("/api/devices/not-a-uuid")).status).toBe(404);
    expect((await admin.get("/api/sites/1")).status).toBe(404);
  });
});
