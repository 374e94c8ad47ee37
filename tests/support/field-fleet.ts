import { sendEchoReadings } from "../api/calibration-readings";
import { sql } from "./db";
import { createTankWithDevice } from "./fleet";
import type { Agent } from "./session";

// A small fleet of our own for the screen tests, provisioned through the management API and fed through
// the device API (never the demo data or the simulator): a tank over its H setpoint with the technician on
// call, and optionally a car park whose bays stand wider than a phone.

export const TANK_MOUNT_M = 3;
const MINUTE = 60_000;

/** The ids of demo accounts, in the order given. */
export async function userIds(emails: string[]): Promise<string[]> {
  const rows = await sql<{ id: string; email: string }>(`SELECT id, email FROM users WHERE email = ANY($1)`, [emails]);
  return emails.map((e) => rows.find((r) => r.email === e)!.id);
}

export async function provisionTankInAlarm(admin: Agent) {
  const fleet = await createTankWithDevice(admin, { device: { expected_interval_s: 3600 } });
  await admin.put(`/api/assets/${fleet.tank.id}/setpoints`).send({ setpoints: { h: { value: 2.0, deadband_m: 0.1, on_delay_s: 0, priority: "medium" } } }).expect(200);
  await admin.put(`/api/sites/${fleet.site.id}/on-call`).send({ user_ids: await userIds(["technician@halftrip.test"]) }).expect(200);
  // Level 1.5 m, then 2.2 m (over H = 2.0 m): distance = mount height − level.
  const start = Date.now() - 12 * MINUTE;
  const levels = [1.5, 1.5, 1.5, 2.2, 2.2, 2.2, 2.2, 2.2, 2.2];
  await sendEchoReadings(fleet.apiKey, levels.map((level, i) => ({ at: new Date(start + i * MINUTE), distanceM: TANK_MOUNT_M - level })));
  return fleet;
}

/** A car park of one level, six bays side by side (wider than 390 px at the plan's minimum bay width). */
export async function provisionCarPark(admin: Agent) {
  const tag = `${Date.now()}-${Math.random().toString(36).slice(2, 7)}`;
  const site = (await admin.post("/api/sites").send({ name: `Car park ${tag}`, time_zone: "Europe/Dublin" }).expect(201)).body;
  const bays: { id: string; name: string }[] = [];
  for (let col = 0; col < 6; col++) {
    const name = `Bay P${col + 1}`;
    const res = await admin
      .post("/api/assets")
      .send({ site_id: site.id, kind: "bay", name, floor_distance_m: 2.5, occupied_below_m: 1.9, bay_row: 0, bay_col: col, bay_level: "Deck 1" })
      .expect(201);
    bays.push({ id: res.body.id, name });
  }
  const device = (
    await admin
      .post("/api/devices")
      .send({ site_id: site.id, serial: `CP-${tag}`, name: `Deck unit ${tag}`, profile: "echo", expected_interval_s: 3600, channels: bays.map((b, index) => ({ index, asset_id: b.id })) })
      .expect(201)
  ).body;
  // P1 sees a roof 1.2 m away (occupied), P2 the floor at 2.5 m (free), pinged half a minute apart (well
  // clear of the crosstalk window); the others send nothing.
  const start = Date.now() - 10 * MINUTE;
  const readings = Array.from({ length: 8 }, (_, i) => [
    { at: new Date(start + i * MINUTE), distanceM: 1.2, channel: 0 },
    { at: new Date(start + i * MINUTE + MINUTE / 2), distanceM: 2.5, channel: 1 },
  ]).flat();
  await sendEchoReadings(device.api_key, readings);
  return { site, bays, device };
}
