import { beforeAll, describe, expect, it } from "vitest";
import { anonymous, signedIn, signInAgent, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { createOtherOrganisation, sql } from "../support/db";
import { EXPORT_BATCH_ROWS } from "@/lib/services/exports";
import { runWorkerOnce } from "../support/worker";
import { csvByName } from "../support/csv";
import { sendEchoReadings } from "./calibration-readings";

// Issue 6 item 8 and "Bad input": streamed CSV exports and their range rules.
let viewer: Agent;
let fleet: Awaited<ReturnType<typeof createTankWithDevice>>;
const MOUNT = 3;
// More readings than one export batch holds, so the keyset paging is crossed.
const N = EXPORT_BATCH_ROWS + 7;
const first = Date.now() - 20 * 3_600_000;

beforeAll(async () => {
  const admin = await signedIn("admin@halftrip.test");
  viewer = await signedIn("viewer@halftrip.test");
  fleet = await createTankWithDevice(admin);
  // A steady 1.25 m level, a reading every 10 s.
  await sendEchoReadings(fleet.apiKey, Array.from({ length: N }, (_, i) => ({ at: new Date(first + i * 10_000), distanceM: MOUNT - 1.25 })));
  await runWorkerOnce();
}, 300_000);

const text = (req: ReturnType<Agent["get"]>) =>
  req.buffer(true).parse((r, done) => {
    let body = "";
    r.on("data", (c: Buffer) => (body += c.toString("utf8")));
    r.on("end", () => done(null, body));
  });

describe("measurements", () => {
  it("streams every measurement of the range once, in time order, to a viewer", async () => {
    const from = new Date(first - 60_000).toISOString();
    const to = new Date().toISOString();
    const res = await text(viewer.get(`/api/exports/measurements?asset_ids=${fleet.tank.id}&from=${from}&to=${to}`));
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^text\/csv/);
    const { header, rows } = csvByName(res.body as string);
    expect(header).toEqual(expect.arrayContaining(["site", "asset", "at", "status", "distance_m", "level_m", "volume_l", "uncertainty_m"]));
    expect(rows).toHaveLength(N);
    // ISO 8601 in the site's zone with its offset, the zone named beside it.
    for (const r of rows) {
      expect(r.at).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d{3})?[+-]\d{2}:\d{2}$/);
      expect(r.site_time_zone).toBe(fleet.site.time_zone);
    }
    const times = rows.map((r) => Date.parse(r.at));
    expect(new Set(times).size).toBe(N);
    expect([...times].sort((a, b) => a - b)).toEqual(times);
    const ok = rows.filter((r) => r.status === "ok");
    expect(ok.length).toBeGreaterThan(N - 20);
    // The level the readings encode, back through c·t/2 (echo times rounded to 0.1 µs: ±0.02 mm).
    for (const r of ok.slice(0, 50)) expect(Number(r.level_m)).toBeCloseTo(1.25, 3);
  });

  it("writes no digit the uncertainty does not support unless full precision is asked for", async () => {
    const range = `asset_ids=${fleet.tank.id}&from=${new Date(first - 60_000).toISOString()}&to=${new Date(first + 600_000).toISOString()}`;
    const measured = csvByName((await text(viewer.get(`/api/exports/measurements?${range}`))).body as string).rows.filter((r) => r.status === "ok");
    const full = csvByName((await text(viewer.get(`/api/exports/measurements?${range}&precision=full`))).body as string).rows.filter((r) => r.status === "ok");
    expect(measured.length).toBeGreaterThan(10);
    expect(full.map((r) => r.at)).toEqual(measured.map((r) => r.at));
    const decimals = (x: string) => (x.split(".")[1] ?? "").length;
    measured.forEach((r, i) => {
      // GUM (JCGM 100:2008) §7.2.6: U = 2u quoted to at most two significant digits, the value to
      // the same decimal place; so the level has at most 1 − floor(log10 U) decimals.
      const U = 2 * Number(full[i].uncertainty_m);
      expect(decimals(r.level_m)).toBeLessThanOrEqual(1 - Math.floor(Math.log10(U)));
      expect(Math.abs(Number(r.level_m) - Number(full[i].level_m))).toBeLessThanOrEqual(U / 10);
      expect(decimals(r.speed_of_sound_ms)).toBeLessThanOrEqual(2);
    });
    // Full precision keeps the computed digits (a speed of sound from c = 331.3·√(1 + t/273.15) is never round).
    expect(full.some((r) => decimals(r.speed_of_sound_ms) > 2)).toBe(true);
  });

  it("exports only the range asked for", async () => {
    const from = new Date(first + 100_000).toISOString();
    const to = new Date(first + 200_000).toISOString();
    const res = await text(viewer.get(`/api/exports/measurements?asset_ids=${fleet.tank.id}&from=${from}&to=${to}`));
    // [first + 100 s, first + 200 s) holds the readings 10 … 19.
    expect((res.body as string).trim().split("\r\n")).toHaveLength(11);
  });

  it("refuses a range that ends before it starts or spans more than 366 days", async () => {
    const url = (from: string, to: string) => `/api/exports/measurements?asset_ids=${fleet.tank.id}&from=${from}&to=${to}`;
    const backwards = await viewer.get(url("2026-03-10", "2026-03-01"));
    expect(backwards.status).toBe(422);
    expect(backwards.body.message).toMatch(/ends before it starts/);
    const long = await viewer.get(url("2024-01-01", "2025-06-30"));
    expect(long.status).toBe(422);
    expect(long.body.message).toMatch(/at most 366 days/);
    // A year of dates, both included: 2025-01-01 … 2025-12-31 is 365 days.
    expect((await viewer.get(url("2025-01-01", "2025-12-31"))).status).toBe(200);
    expect((await viewer.get(url("yesterday", "2025-12-31"))).status).toBe(422);
    expect((await viewer.get(`/api/exports/measurements?from=2025-01-01&to=2025-01-02`)).status).toBe(422);
    const alarms = await viewer.get("/api/exports/alarms?from=2026-03-10&to=2026-03-01");
    expect(alarms.status).toBe(422);
  });

  it("answers 404 for another organisation's asset and 401 without a session", async () => {
    const other = await createOtherOrganisation();
    const { agent } = await signInAgent(other.adminEmail, other.password);
    expect((await agent.get(`/api/exports/measurements?asset_ids=${fleet.tank.id}&from=2026-01-01&to=2026-01-02`)).status).toBe(404);
    expect((await anonymous().get(`/api/exports/measurements?asset_ids=${fleet.tank.id}&from=2026-01-01&to=2026-01-02`)).status).toBe(401);
  });
});

describe("alarms", () => {
  it("streams the alarm events of the range as CSV", async () => {
    // An alarm and one event written as the alarm stage would (its tables from db/migrations/0004-alarms.ts).
    const [org] = await sql<{ organisation_id: string }>(`SELECT organisation_id FROM sites WHERE id = $1`, [fleet.site.id]);
    const [alarm] = await sql<{ id: string }>(
      `INSERT INTO alarms (organisation_id, site_id, asset_id, kind, priority, state, condition_active, value, setpoint, unit)
       VALUES ($1, $2, $3, 'l', 'medium', 'unacknowledged', true, 0.61, 0.7, 'm') RETURNING id`,
      [org.organisation_id, fleet.site.id, fleet.tank.id],
    );
    const at = new Date(Date.now() - 3_600_000);
    await sql(
      `INSERT INTO alarm_events (alarm_id, organisation_id, at, kind, from_state, to_state, cause, value, setpoint, priority, comment)
       VALUES ($1, $2, $3, 'activated', 'normal', 'unacknowledged', 'condition', 0.61, 0.7, 'medium', 'level, low "L"')`,
      [alarm.id, org.organisation_id, at],
    );
    const res = await text(viewer.get(`/api/exports/alarms?from=${new Date(Date.now() - 30 * 86_400_000).toISOString()}&to=${new Date().toISOString()}`));
    expect(res.status).toBe(200);
    const { header, rows } = csvByName(res.body as string);
    expect([...header].sort()).toEqual(["alarm_id", "alarm_kind", "asset", "at", "by", "cause", "comment", "event", "from_state", "priority", "setpoint", "site", "site_time_zone", "to_state", "unit", "value"]);
    const ours = rows.filter((r) => r.alarm_id === alarm.id);
    expect(ours).toHaveLength(1);
    // The same instant, written in the site's clock with its offset.
    expect(Date.parse(ours[0].at)).toBe(at.getTime());
    expect(ours[0].at).toMatch(/[+-]\d{2}:\d{2}$/);
    expect(ours.map(({ at: _at, ...rest }) => rest)).toEqual([
      {
        site_time_zone: fleet.site.time_zone, site: fleet.site.name, asset: fleet.tank.name, alarm_kind: "l", priority: "medium", event: "activated", from_state: "normal",
        to_state: "unacknowledged", cause: "condition", value: "0.61", setpoint: "0.7", unit: "m", by: "", comment: 'level, low "L"', alarm_id: alarm.id,
      },
    ]);
    // RFC 4180 §2.6–2.7: a field with a comma or a quote is quoted, its quotes doubled.
    expect(res.body).toContain(`"level, low ""L"""`);
  });
});
