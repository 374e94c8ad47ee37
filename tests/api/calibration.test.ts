import { beforeAll, describe, expect, it } from "vitest";
import { signedIn, signInAgent, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { createOtherOrganisation, sql } from "../support/db";
import { runWorkerOnce } from "../support/worker";
import { sendEchoReadings, type SentReading } from "./calibration-readings";

// Issue 6 item 6: manual dips beside the sensor, a least-squares calibration previewed and applied,
// the recompute that follows, and who may do it.
let admin: Agent;
let technician: Agent;
let fleet: Awaited<ReturnType<typeof createTankWithDevice>>;

// The tank of tests/support/fleet.ts: sensor face 3 m above the bottom, no face offset.
const MOUNT = 3;
// A sensor that reads 2 % long with a 15 mm zero error: raw = 1.02·true + 0.015 (invented for the test).
const rawFor = (trueDistanceM: number) => 1.02 * trueDistanceM + 0.015;
const HOUR = 3_600_000;
const start = Date.now() - 8 * HOUR;
// The level falls steadily from 2.0 m to 0.8 m over six hours, a reading every 10 minutes.
const levelAt = (t: number) => 2.0 - (1.2 * (t - start)) / (6 * HOUR);
const dipTimes = [start + HOUR, start + 5 * HOUR];
const dipIds: string[] = [];

beforeAll(async () => {
  admin = await signedIn("admin@halftrip.test");
  technician = await signedIn("technician@halftrip.test");
  fleet = await createTankWithDevice(admin);
  const readings: SentReading[] = Array.from({ length: 37 }, (_, i) => {
    const t = start + i * 10 * 60_000;
    return { at: new Date(t), distanceM: rawFor(MOUNT - levelAt(t)) };
  });
  await sendEchoReadings(fleet.apiKey, readings);
  await runWorkerOnce();
});

const channelId = () => fleet.device.channels[0].id as string;

describe("manual dips", () => {
  it("records a dip and shows it beside the sensor's level at that time", async () => {
    for (const t of dipTimes) {
      const res = await technician.post(`/api/assets/${fleet.tank.id}/dips`).send({ at: new Date(t).toISOString(), level_m: Number(levelAt(t).toFixed(4)), note: "tape" });
      expect(res.status).toBe(201);
      dipIds.push(res.body.id);
    }
    const list = (await technician.get(`/api/assets/${fleet.tank.id}/dips`).expect(200)).body;
    expect(list.channel_id).toBe(channelId());
    expect(list.items).toHaveLength(2);
    for (const dip of list.items) {
      expect(dip.by).toBeTruthy();
      expect(dip.sensor).not.toBeNull();
      const t = new Date(dip.at).getTime();
      // Uncalibrated, the sensor reads level = 3 − (1.02·(3 − L) + 0.015), so it differs by −(0.02·(3 − L) + 0.015) (by hand).
      expect(dip.difference_m).toBeCloseTo(-(0.02 * (MOUNT - levelAt(t)) + 0.015), 3);
    }
    const audit = (await admin.get(`/api/audit?entity_id=${fleet.tank.id}`).expect(200)).body.items.map((a: { action: string }) => a.action);
    expect(audit).toContain("dip.record");
  });

  it("refuses a dip above the tank, in the future, before the tank had data, or at a time already dipped", async () => {
    const url = `/api/assets/${fleet.tank.id}/dips`;
    const tank = (await technician.get(url).expect(200)).body.asset;
    // The tank of tests/support/fleet.ts is 2.8 m deep: the message names that figure, as the form's hint does.
    expect(tank.max_dip_level_m).toBe(2.8);
    const high = await technician.post(url).send({ level_m: 2.9 });
    expect(high.status).toBe(422);
    expect(high.body.fields.level_m).toBe("The tank is 2.800 m deep; a dip reads at most that.");
    const huge = await technician.post(url).send({ level_m: 99_999 });
    expect(huge.status).toBe(422);
    expect(huge.body.fields.level_m).toBe("The tank is 2.800 m deep; a dip reads at most that.");
    expect(huge.body.message).not.toMatch(/100 m/);
    const future = await technician.post(url).send({ level_m: 1, at: new Date(Date.now() + HOUR).toISOString() });
    expect(future.status).toBe(422);
    expect(future.body.fields.at).toMatch(/future/);
    // The tank was created a moment ago and its earliest measurement is `start` (8 h ago): a dip before that, and one in 2020, are refused.
    for (const at of [new Date(start - HOUR), new Date("2020-06-01T08:00:00Z")]) {
      const early = await technician.post(url).send({ level_m: 1, at: at.toISOString() });
      expect(early.status).toBe(422);
      expect(early.body.fields.at).toMatch(/before this tank had any data/);
    }
    expect((await technician.post(url).send({ level_m: 1, at: new Date(dipTimes[0]).toISOString() })).status).toBe(409);
  });

  it("voids a wrong dip with a reason: kept in the list with who and why, audited, out of calibration", async () => {
    const url = `/api/assets/${fleet.tank.id}/dips`;
    // A dip within the tank's data (90 min ago) that was read wrong.
    const wrong = await technician.post(url).send({ level_m: 2.5, at: new Date(start + 6.5 * HOUR).toISOString(), note: "read the wrong tape mark" }).expect(201);
    expect((await technician.post(`/api/dips/${wrong.body.id}/void`).send({})).status).toBe(422);
    for (const email of ["operator@halftrip.test", "viewer@halftrip.test"]) {
      expect((await (await signedIn(email)).post(`/api/dips/${wrong.body.id}/void`).send({ reason: "not mine to void" })).status).toBe(403);
    }
    const voided = await technician.post(`/api/dips/${wrong.body.id}/void`).send({ reason: "tape read at the wrong mark" });
    expect(voided.status).toBe(200);
    expect((await technician.post(`/api/dips/${wrong.body.id}/void`).send({ reason: "again" })).status).toBe(409);
    const item = (await technician.get(url).expect(200)).body.items.find((d: { id: string }) => d.id === wrong.body.id);
    expect(item).toMatchObject({ level_m: 2.5, void: { reason: "tape read at the wrong mark", by: expect.any(String), at: expect.any(String) } });
    const stored = await sql<{ voided_by: string | null; void_reason: string }>(`SELECT voided_by, void_reason FROM manual_dips WHERE id = $1`, [wrong.body.id]);
    expect(stored[0].voided_by).not.toBeNull();
    const audit = (await admin.get(`/api/audit?entity_id=${fleet.tank.id}`).expect(200)).body.items;
    expect(audit.find((a: { action: string }) => a.action === "dip.void")).toMatchObject({ details: { dip_id: wrong.body.id, reason: "tape read at the wrong mark" } });
    const refused = await technician.post(`/api/channels/${channelId()}/calibration/preview`).send({ dip_ids: [...dipIds, wrong.body.id] });
    expect(refused.status).toBe(422);
    expect(refused.body.message).toMatch(/is void/);
    // The time of a voided dip is free again for the corrected one.
    expect((await technician.post(url).send({ level_m: 0.9, at: new Date(start + 6.5 * HOUR).toISOString() })).status).toBe(201);
    const other = await createOtherOrganisation();
    const { agent } = await signInAgent(other.adminEmail, other.password);
    expect((await agent.post(`/api/dips/${dipIds[0]}/void`).send({ reason: "not ours" })).status).toBe(404);
  });

  it("lets only admins and technicians record dips", async () => {
    for (const email of ["operator@halftrip.test", "viewer@halftrip.test"]) {
      const agent = await signedIn(email);
      expect((await agent.get(`/api/assets/${fleet.tank.id}/dips`)).status).toBe(200);
      expect((await agent.post(`/api/assets/${fleet.tank.id}/dips`).send({ level_m: 1 })).status).toBe(403);
      expect((await agent.post(`/api/channels/${channelId()}/calibration/preview`).send({ dip_ids: dipIds })).status).toBe(403);
      expect((await agent.post(`/api/channels/${channelId()}/calibration`).send({ dip_ids: dipIds })).status).toBe(403);
    }
  });
});

describe("calibration", () => {
  it("previews the least-squares fit with its residuals and changes nothing", async () => {
    const res = await technician.post(`/api/channels/${channelId()}/calibration/preview`).send({ dip_ids: dipIds });
    expect(res.status).toBe(200);
    const p = res.body;
    // Inverting raw = 1.02·true + 0.015: true = raw/1.02 − 0.015/1.02 (by hand); two dips fix the line exactly.
    expect(p.proposed.mode).toBe("offset_and_scale");
    expect(p.proposed.scale).toBeCloseTo(1 / 1.02, 4);
    expect(p.proposed.offset_m).toBeCloseTo(-0.015 / 1.02, 4);
    expect(p.rms_after_m).toBeLessThan(1e-4);
    expect(p.rms_before_m).toBeGreaterThan(0.02);
    expect(p.residuals).toHaveLength(2);
    // The dips read 1.8 m and 1.0 m (levelAt at 1 h and 5 h): 0.8 m apart; the sensor's raw distances at
    // their times, 1.02·true + 0.015, are 1.02 × 0.8 = 0.816 m apart (by hand). Told apart, not mixed.
    expect(p.spread.dips_m).toBeCloseTo(0.8, 3);
    expect(p.spread.sensor_m).toBeCloseTo(0.816, 3);
    expect(p.spread.sentence).toBe("The dips span 800 mm; the sensor's readings at their times lie within 816 mm of each other.");
    expect(p.series.length).toBeGreaterThan(10);
    // The previewed trend after calibration passes through the dips (within the 10-minute buckets' spread).
    for (const dip of p.dips) {
      const t = new Date(dip.at).getTime();
      const nearest = p.series.reduce((best: { at: string }, s: { at: string }) => (Math.abs(new Date(s.at).getTime() - t) < Math.abs(new Date(best.at).getTime() - t) ? s : best));
      expect(nearest.level_after_m).toBeCloseTo(levelAt(new Date(nearest.at).getTime()), 2);
    }
    const channel = (await technician.get(`/api/channels/${channelId()}/calibration`).expect(200)).body.channel;
    expect(channel.calibration_scale).toBe(1);
    expect(channel.calibration_offset_m).toBe(0);
  });

  it("refuses a single dip and a dip the sensor did not see", async () => {
    const one = await technician.post(`/api/channels/${channelId()}/calibration/preview`).send({ dip_ids: [dipIds[0]] });
    expect(one.status).toBe(422);
    // After the last reading (start + 6 h) by more than the hour a dip is matched within, and still before now.
    const lonely = await technician.post(`/api/assets/${fleet.tank.id}/dips`).send({ level_m: 1, at: new Date(start + 7.25 * HOUR).toISOString() }).expect(201);
    const unseen = await technician.post(`/api/channels/${channelId()}/calibration/preview`).send({ dip_ids: [...dipIds, lonely.body.id] });
    expect(unseen.status).toBe(422);
    expect(unseen.body.message).toMatch(/No sensor reading within an hour/);
  });

  it("applies it: calibration, history, recompute and audit, and the sensor then agrees with the dips", async () => {
    const res = await technician.post(`/api/channels/${channelId()}/calibration`).send({ dip_ids: dipIds, note: "after tank clean" });
    expect(res.status).toBe(201);
    const { channel, history } = (await technician.get(`/api/channels/${channelId()}/calibration`).expect(200)).body;
    expect(channel.calibration_scale).toBeCloseTo(1 / 1.02, 4);
    expect(history[0]).toMatchObject({ before: { offset_m: 0, scale: 1 }, mode: "offset_and_scale", note: "after tank clean", by: expect.any(String) });
    expect(history[0].after.scale).toBeCloseTo(1 / 1.02, 4);
    const requests = await sql<{ reason: string }>(`SELECT reason FROM recompute_requests WHERE id = $1`, [res.body.recompute_request_id]);
    expect(requests).toEqual([{ reason: "calibration" }]);
    const audit = (await admin.get(`/api/audit?entity_id=${channelId()}`).expect(200)).body.items;
    expect(audit[0]).toMatchObject({ action: "channel.calibrate", details: { before: { offset_m: 0, scale: 1 } } });

    await runWorkerOnce();
    const list = (await technician.get(`/api/assets/${fleet.tank.id}/dips`).expect(200)).body;
    for (const dip of list.items.filter((d: { id: string }) => dipIds.includes(d.id))) expect(Math.abs(dip.difference_m)).toBeLessThan(0.001);
  });

  it("answers 404 for another organisation's channel", async () => {
    const other = await createOtherOrganisation();
    const { agent } = await signInAgent(other.adminEmail, other.password);
    expect((await agent.get(`/api/channels/${channelId()}/calibration`)).status).toBe(404);
    expect((await agent.post(`/api/channels/${channelId()}/calibration`).send({ dip_ids: dipIds })).status).toBe(404);
    expect((await agent.get(`/api/assets/${fleet.tank.id}/dips`)).status).toBe(404);
    expect((await agent.get(`/api/channels/not-an-id/calibration`)).status).toBe(404);
  });
});
