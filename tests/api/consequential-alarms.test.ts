import { beforeAll, describe, expect, it } from "vitest";
import { anonymous, signedIn, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { sql } from "../support/db";
import { waitForMail } from "../support/mail-sink";
import { runWorkerOnce } from "../support/worker";

// Consequential alarms, history and maintenance end to end (issue 13): readings through the device
// API, the worker (tests/support/worker.ts) and the mail sink. The rules are Halftrip's
// rationalisation (lib/alarms/consequential.ts); the state names are ISA-18.2's (REFERENCES.md §4).

// Speed of sound in dry air at 20 °C (REFERENCES.md §1); the test tank's sensor face is 3 m above the bottom.
const C_20 = 343.215;
const MOUNT_M = 3;
// Round-trip echo time for the distance to the surface: t = 2·d / c (REFERENCES.md §2).
const echoUs = (level: number) => Math.round(((2 * (MOUNT_M - level)) / C_20) * 1e7) / 10;

let admin: Agent;
let operator: Agent;
let technician: Agent;
let technicianId: string;

beforeAll(async () => {
  [admin, operator, technician] = await Promise.all(["admin", "operator", "technician"].map((r) => signedIn(`${r}@halftrip.test`)));
  technicianId = (await sql<{ id: string }>(`SELECT id FROM users WHERE email = 'technician@halftrip.test'`))[0].id;
});

const SETPOINTS = {
  hh: { value: 2.5, deadband_m: 0.14, on_delay_s: 30, priority: "high" },
  h: { value: 2.0, deadband_m: 0.14, on_delay_s: 30, priority: "medium" },
  l: { value: 0.6, priority: "low" },
  ll: { value: 0.3, priority: "high" },
};

interface Reading {
  at: number;
  level: number;
  channel?: number;
}

async function fleetWithAlarms(opts: { channels?: number[]; expectedIntervalS?: number } = {}) {
  const fleet = await createTankWithDevice(admin, { channels: opts.channels, device: { expected_interval_s: opts.expectedIntervalS ?? 3600 } });
  await operator.put(`/api/assets/${fleet.tank.id}/setpoints`).send({ setpoints: SETPOINTS }).expect(200);
  await operator.put(`/api/sites/${fleet.site.id}/on-call`).send({ user_ids: [technicianId] }).expect(200);
  let seq = 1;
  const post = async (readings: Reading[]) => {
    const body = readings.map((r) => ({ seq: seq++, at: new Date(r.at).toISOString(), channel: r.channel ?? 0, echo_us: echoUs(r.level), air_temp_c: 20 }));
    const res = await anonymous().post("/api/v1/readings").set("Authorization", `Bearer ${fleet.apiKey}`).send({ readings: body });
    if (res.status !== 202 || res.body.rejected.length) throw new Error(`readings: ${res.status} ${JSON.stringify(res.body)}`);
  };
  let clock = 0;
  /** Live readings 10 s apart, the last about now (and never before the previous send's last). */
  const live = (levels: number[]) => {
    clock = Math.max(clock, Date.now() - levels.length * 10_000);
    return post(levels.map((level) => ({ at: (clock += 10_000), level })));
  };
  return { ...fleet, post, live };
}

async function alarmsOf(query: string) {
  return (await operator.get(`/api/alarms?${query}&page_size=200`).expect(200)).body;
}

async function levelAlarm(tankId: string, kind: string) {
  const list = await alarmsOf(`asset_id=${tankId}&kind=${kind}&include=suppressed`);
  expect(list.items).toHaveLength(1);
  return (await operator.get(`/api/alarms/${list.items[0].id}`).expect(200)).body;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
// Distinct levels 2 mm apart, so the raw values are never stuck (the stuck check compares raw values exactly).
const varied = (base: number, n: number) => Array.from({ length: n }, (_, i) => base + (i % 2 ? 0.002 : -0.002) + i * 0.0005);

describe("consequential alarms", () => {
  it("raises ONE device alarm for a silent three-channel device; its channel alarms are suppressed by design and shown on request", async () => {
    // Offline after 3 expected intervals (PRODUCT.md): 3 × 6 s — long enough that a slow worker pass
    // after fresh readings does not find the device silent again.
    const f = await fleetWithAlarms({ channels: [0, 1, 2], expectedIntervalS: 6 });
    // Channels pinged 1 s apart, so the device's health check sees no crosstalk risk between them.
    const levels = [1.2, 0.7, 1.9];
    const ping = () => f.post([0, 1, 2].map((channel) => ({ at: Date.now() - (2 - channel) * 1000, level: levels[channel], channel })));
    await ping();
    await runWorkerOnce();
    await sleep(19_000);
    await runWorkerOnce();

    const visible = await alarmsOf(`site_id=${f.site.id}&state=active`);
    expect(visible.items.map((a: { kind: string }) => a.kind)).toEqual(["device_offline"]);
    expect(visible.items[0]).toMatchObject({ state: "unacknowledged", device: { id: f.device.id }, cause_key: `device:${f.device.id}:offline` });

    const all = await alarmsOf(`site_id=${f.site.id}&state=active&include=suppressed&group=cause`);
    const offline = all.items.filter((a: { kind: string }) => a.kind === "offline");
    expect(offline).toHaveLength(3);
    for (const a of offline) expect(a).toMatchObject({ state: "suppressed_by_design", cause_key: `device:${f.device.id}:offline` });
    // Without readings the tank's four level alarms are suppressed as well (nothing to judge a level by).
    const level = all.items.filter((a: { kind: string }) => ["hh", "h", "l", "ll"].includes(a.kind));
    expect(level.map((a: { state: string }) => a.state)).toEqual(Array(4).fill("suppressed_by_design"));
    // Grouped by cause: the device alarm and the seven alarms it suppresses are one group.
    expect(all.groups).toEqual([expect.objectContaining({ key: `cause:device:${f.device.id}:offline`, counts: expect.objectContaining({ total: 8, needsAttention: 1, hidden: 7 }) })]);
    const events = (await operator.get(`/api/alarms/${offline[0].id}`).expect(200)).body.events;
    expect(events.map((e: { kind: string }) => e.kind)).toEqual(expect.arrayContaining(["suppressed", "condition_active_logged"]));
    expect(events.find((e: { kind: string }) => e.kind === "suppressed").cause).toMatch(/^suppressed by design: .* silent since/);

    // Readings again: the device alarm clears and the channel alarms are released to normal.
    await ping();
    await runWorkerOnce();
    const after = await alarmsOf(`site_id=${f.site.id}&include=suppressed`);
    expect(after.items.filter((a: { state: string }) => a.state === "suppressed_by_design")).toHaveLength(0);
    expect(after.items.find((a: { kind: string }) => a.kind === "device_offline")).toMatchObject({ state: "returned_unacknowledged", condition_active: false });
  }, 120_000);

  it("suppresses a tank's level alarms while its channel is stuck and judges them again once it recovers", async () => {
    const f = await fleetWithAlarms();
    // 24 identical raw values above H: the stuck check (20 equal samples, common practice) opens a stuck flag.
    await f.live(Array.from({ length: 24 }, () => 2.2));
    await runWorkerOnce();
    const suppressed = await levelAlarm(f.tank.id, "h");
    expect(suppressed).toMatchObject({ state: "suppressed_by_design", condition_active: true });
    expect(suppressed.cause_key).toMatch(/^channel:.*:stuck$/);
    expect((await alarmsOf(`asset_id=${f.tank.id}&kind=h`)).items).toHaveLength(0);
    expect(suppressed.events.find((e: { kind: string }) => e.kind === "suppressed").cause).toMatch(/stuck fault/);

    // Varying values below H: the stuck flag clears and the alarm is released to normal.
    await f.live(varied(1.5, 12));
    await runWorkerOnce();
    const released = await levelAlarm(f.tank.id, "h");
    expect(released).toMatchObject({ state: "normal", condition_active: false, cause_key: null });
    expect(released.events.map((e: { kind: string }) => e.kind)).toContain("unsuppressed");

    // Fresh values above H for longer than the 30 s on-delay: annunciated as usual.
    await f.live(varied(2.2, 12));
    await runWorkerOnce();
    expect(await levelAlarm(f.tank.id, "h")).toMatchObject({ state: "unacknowledged", condition_active: true });
  }, 120_000);
});

describe("history is recorded, not announced", () => {
  it("stores a late activation-and-clear as returned-to-normal history without e-mail", async () => {
    const f = await fleetWithAlarms();
    const start = Date.now() - 2 * 3600_000;
    // Two hours ago (a store-and-forward upload): 1.5 m, five minutes at 2.2 m (over H for longer than the on-delay), 1.5 m again.
    const levels = [...Array(6).fill(1.5), ...Array(30).fill(0).map((_, i) => 2.2 + (i % 2) * 0.002), ...Array(6).fill(1.5)];
    await f.post(levels.map((level, i) => ({ at: start + i * 10_000, level })));
    await runWorkerOnce();
    const h = await levelAlarm(f.tank.id, "h");
    expect(h).toMatchObject({ state: "normal", condition_active: false, activations: 1 });
    const kinds = h.events.map((e: { kind: string }) => e.kind).reverse();
    expect(kinds).toEqual(["activated", "returned_to_normal", "recorded_as_history"]);
    expect(Date.parse(h.events.find((e: { kind: string }) => e.kind === "activated").at)).toBeLessThan(Date.now() - 3600_000);
    expect(await sql(`SELECT id FROM alarm_notifications WHERE alarm_id = $1`, [h.id])).toEqual([]);
    await expect(waitForMail("technician@halftrip.test", (m) => m.subject.includes(f.tank.name), 3000)).rejects.toThrow(/no mail/);
  }, 120_000);

  it("does not raise an offline alarm for a gap that a backfill fills in one upload", async () => {
    // Expected every 60 s; the backfill has a 30-minute hole in its measurement times but arrives at once.
    const f = await fleetWithAlarms({ expectedIntervalS: 60 });
    const start = Date.now() - 3 * 3600_000;
    const times = [...Array.from({ length: 30 }, (_, i) => start + i * 60_000), ...Array.from({ length: 30 }, (_, i) => start + 60 * 60_000 + i * 60_000)];
    await f.post(times.map((at, i) => ({ at, level: 1.5 + (i % 3) * 0.003 })));
    await runWorkerOnce();
    expect(await sql(`SELECT f.since FROM health_flags f JOIN channels ch ON ch.id = f.channel_id WHERE ch.device_id = $1 AND f.flag = 'offline'`, [f.device.id])).toEqual([]);
    expect((await alarmsOf(`site_id=${f.site.id}&kind=offline,device_offline&include=suppressed`)).items).toEqual([]);
  }, 120_000);
});

describe("maintenance of a device or a site", () => {
  it("shelves every alarm of a device until its expiry, then they return; checks reason, expiry and role", async () => {
    const f = await fleetWithAlarms();
    await f.live(varied(2.2, 12));
    await runWorkerOnce();
    expect((await levelAlarm(f.tank.id, "h")).state).toBe("unacknowledged");

    const until = () => new Date(Date.now() + 10_000).toISOString();
    await technician.post(`/api/devices/${f.device.id}/maintenance`).send({ mode: "shelve", reason: "replacing the sensor bracket", until: until() }).expect(403);
    const short = await operator.post(`/api/devices/${f.device.id}/maintenance`).send({ mode: "shelve", reason: "work", until: until() }).expect(422);
    expect(short.body.fields).toHaveProperty("reason");
    // A shelve lasts at most 24 h (ISA-18.2 asks for a time limit; 24 h is the maximum).
    const long = await operator.post(`/api/devices/${f.device.id}/maintenance`).send({ mode: "shelve", reason: "replacing the sensor bracket", until: new Date(Date.now() + 25 * 3600_000).toISOString() }).expect(422);
    expect(long.body.fields).toHaveProperty("until");

    const started = await operator.post(`/api/devices/${f.device.id}/maintenance`).send({ mode: "shelve", reason: "replacing the sensor bracket", until: until() }).expect(201);
    expect(started.body.alarms_changed).toBeGreaterThanOrEqual(1);
    const shelved = await levelAlarm(f.tank.id, "h");
    expect(shelved).toMatchObject({ state: "shelved", shelve_reason: "replacing the sensor bracket" });
    expect(await sql(`SELECT actor_label FROM audit_log WHERE action = 'device.maintenance' AND entity_id = $1`, [f.device.id])).toEqual([{ actor_label: "operator@halftrip.test" }]);

    await sleep(10_500);
    await runWorkerOnce();
    expect((await levelAlarm(f.tank.id, "h")).state).toBe("unacknowledged");
  }, 120_000);

  it("covers an alarm raised during the window: a device silenced by the work is shelved with it, not e-mailed", async () => {
    // Offline after 3 expected intervals (PRODUCT.md): 3 × 6 s — long enough that a slow worker pass
    // after fresh readings does not find the device silent again.
    const f = await fleetWithAlarms({ expectedIntervalS: 6 });
    await f.post([{ at: Date.now(), level: 1.2 }]);
    await runWorkerOnce();
    expect((await alarmsOf(`site_id=${f.site.id}&kind=device_offline&include=suppressed`)).items).toHaveLength(0);
    const body = { mode: "shelve", reason: "unplugged to replace the sensor cable", until: new Date(Date.now() + 120_000).toISOString() };
    await operator.post(`/api/devices/${f.device.id}/maintenance`).send(body).expect(201);

    await sleep(19_000);
    await runWorkerOnce();
    const raised = (await alarmsOf(`site_id=${f.site.id}&kind=device_offline&include=suppressed`)).items;
    expect(raised).toHaveLength(1);
    const detail = (await operator.get(`/api/alarms/${raised[0].id}`).expect(200)).body;
    expect(detail).toMatchObject({ state: "shelved", shelve_reason: "unplugged to replace the sensor cable", condition_active: true });
    expect(detail.events.map((e: { kind: string }) => e.kind)).toEqual(expect.arrayContaining(["activated", "shelved"]));
    expect(await sql(`SELECT id FROM alarm_notifications WHERE alarm_id = $1`, [raised[0].id])).toEqual([]);
    const [window] = await sql<{ members: string[] }>(`SELECT members FROM maintenance_windows WHERE device_id = $1`, [f.device.id]);
    expect(window.members).toContain(raised[0].id);
  }, 120_000);

  it("takes a whole site out of service (admins only) and returns its alarms at the window's end", async () => {
    const f = await fleetWithAlarms();
    await f.live(varied(2.2, 12));
    await runWorkerOnce();
    const body = { mode: "out_of_service", reason: "tank cleaning by contractor", until: new Date(Date.now() + 10_000).toISOString() };
    await operator.post(`/api/sites/${f.site.id}/maintenance`).send(body).expect(403);
    const started = await admin.post(`/api/sites/${f.site.id}/maintenance`).send(body).expect(201);
    expect(started.body).toMatchObject({ scope: "site", mode: "out_of_service" });
    expect((await levelAlarm(f.tank.id, "h")).state).toBe("out_of_service");
    await sleep(10_500);
    await runWorkerOnce();
    const back = await levelAlarm(f.tank.id, "h");
    expect(back.state).toBe("unacknowledged");
    expect(back.events.map((e: { kind: string }) => e.kind)).toContain("returned_to_service");
  }, 120_000);
});
