import { beforeAll, describe, expect, it } from "vitest";
import { anonymous, signedIn, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { runWorkerOnce } from "../support/worker";
import { csvByName } from "../support/csv";
import { sql } from "../support/db";
import { levelHistory, sendEchoReadings } from "./calibration-readings";

// Issue 15 §2 and §3: the refill plan follows each tank's purpose (supply: reorder date and delivery;
// sump: time to pump out; reserve: topped up below its minimum; process: alarms only), lists a tank
// with a fault flag or a stale value as "needs a check" with the reason, unscheduled, and gives no
// dates until a forecast is ready (DEVELOPERS.md "Forecast readiness": 48 h of steady history).
// Everything goes through the device API and the worker (runWorkerOnce).
let admin: Agent;
let viewer: Agent;
type Made = Awaited<ReturnType<typeof createTankWithDevice>>;
const KEYS = ["soon", "later", "below", "sump", "reserveLow", "reserveFull", "process", "short", "stuck", "stale"] as const;
type Key = (typeof KEYS)[number];
const tanks = {} as Record<Key, Made>;

// The tank of tests/support/fleet.ts: 2 m × 1.5 m floor (3 000 L a metre), 8 400 L, sensor 3 m above
// the bottom, reorder at 25 % (2 100 L, 0.7 m), safe fill 90 % (7 560 L) — computed.
const MOUNT = 3;
const L_PER_M = 3000;
const DAY = 86_400_000;
const HOUR = 3_600_000;
// Every fixture is dated from this one instant (whole minute, a little before the requests).
const END = new Date(Math.floor(Date.now() / 60_000) * 60_000 - 2 * 60_000);
// Hourly readings: an hour is what each device says it reports at, so a value is stale after 3 h.
const HOURLY = { expected_interval_s: 3600 };

beforeAll(async () => {
  admin = await signedIn("admin@halftrip.test");
  viewer = await signedIn("viewer@halftrip.test");
  const purpose: Partial<Record<Key, Record<string, unknown>>> = {
    sump: { purpose: "sump", safe_fill_pct: 80, reorder_pct: 10 },
    reserveLow: { purpose: "reserve", reorder_pct: 70 },
    reserveFull: { purpose: "reserve", reorder_pct: 70 },
    process: { purpose: "process" },
  };
  for (const key of KEYS) tanks[key] = await createTankWithDevice(admin, { asset: purpose[key], device: HOURLY });
  const send = (key: Key, hours: number, from: number, to: number, opts: { end?: Date; jitterM?: number } = {}) =>
    sendEchoReadings(tanks[key].apiKey, levelHistory(MOUNT, opts.end ?? END, hours, from, to, { jitterM: opts.jitterM }));
  // Supply, 1.3 → 1.0 m over 72 h: 300 L a day down to 3 000 L.
  await send("soon", 72, 1.3, 1.0);
  // Supply, 2.0 → 1.8 m over 72 h: 200 L a day down to 5 400 L.
  await send("later", 72, 2.0, 1.8);
  // Supply at 0.6 m (1 800 L), below its reorder level, level.
  await send("below", 72, 0.6, 0.6);
  // Sump (pump-out level 80 % = 6 720 L, pumped down to 10 % = 840 L), 0.5 → 1.1 m over 72 h: filling 600 L a day to 3 300 L.
  await send("sump", 72, 0.5, 1.1);
  // Reserves with a 70 % minimum (5 880 L): one at 1.8 m (5 400 L), one at 2.4 m (7 200 L).
  await send("reserveLow", 72, 1.8, 1.8);
  await send("reserveFull", 72, 2.4, 2.4);
  // A process buffer falling like "soon": alarms only, never planned.
  await send("process", 72, 1.3, 1.0);
  // Supply with only 20 h of history: no forecast yet.
  await send("short", 20, 1.5, 1.45);
  // Supply whose raw value has not moved for 72 readings: the worker flags it stuck.
  await send("stuck", 72, 1.5, 1.5, { jitterM: 0 });
  // Supply falling like "soon", silent for the last 5 h (more than 3 hourly intervals).
  await send("stale", 72, 1.3, 1.0, { end: new Date(END.getTime() - 5 * HOUR) });
  await runWorkerOnce();
}, 240_000);

type Item = { asset_id: string; status: string; action: string | null; due_at: string | null; days_to_due: number | null; limit_at: string | null; volume_l: number | null; current_volume_l: number | null; purpose: string; checks: { code: string; text: string }[] };
const keyOf = (id: string) => KEYS.find((k) => tanks[k].tank.id === id);
const mine = <T extends { asset_id: string }>(items: T[]) => items.filter((i) => keyOf(i.asset_id) !== undefined);
const item = (items: Item[], key: Key) => items.find((i) => i.asset_id === tanks[key].tank.id);
const plan = async (horizon: number) => (await viewer.get(`/api/refill-plan?horizon_days=${horizon}`).expect(200)).body as { items: Item[]; unplanned: { asset_id: string; status: string; reason: string }[] };
const near = (at: string | null, expectedMs: number, toleranceMs: number) => {
  expect(at).not.toBeNull();
  expect(Math.abs(Date.parse(at!) - expectedMs)).toBeLessThan(toleranceMs);
};

describe("GET /api/refill-plan by purpose", () => {
  it("lists checks first, then what is due now, then by due date; process tanks and full reserves not at all", async () => {
    const { items } = await plan(14);
    const listed = mine(items);
    expect(listed.map((i) => i.status)).toEqual(["needs_check", "needs_check", "due_now", "due_now", "due", "due"]);
    expect(new Set(listed.slice(0, 2).map((i) => keyOf(i.asset_id)))).toEqual(new Set(["stuck", "stale"]));
    expect(new Set(listed.slice(2, 4).map((i) => keyOf(i.asset_id)))).toEqual(new Set(["below", "reserveLow"]));
    expect(listed.slice(4).map((i) => keyOf(i.asset_id))).toEqual(["soon", "sump"]);
    // 16.5 days away (below): only within a longer horizon.
    expect(mine((await plan(30)).items).map((i) => keyOf(i.asset_id))).toContain("later");
    expect(mine((await plan(3)).items).map((i) => keyOf(i.asset_id))).not.toContain("sump");
  });

  it("gives a supply tank its reorder date, empty date and delivery to safe fill", async () => {
    const soon = item((await plan(14)).items, "soon")!;
    expect(soon).toMatchObject({ purpose: "supply", status: "due", action: "deliver" });
    // Computed: (3 000 − 2 100) L / 300 L a day = 3 d; empty at 3 000 / 300 = 10 d. The projection
    // starts at the 5-minute bucket's middle (±2.5 min) and the echo time's 0.1 µs rounding moves the
    // level by under 0.02 mm: well within 15 min.
    near(soon.due_at, END.getTime() + 3 * DAY, 15 * 60_000);
    near(soon.limit_at, END.getTime() + 10 * DAY, 15 * 60_000);
    expect(soon.current_volume_l).toBeCloseTo(1.0 * L_PER_M, -1);
    // Safe fill 7 560 L − the volume now.
    expect(soon.volume_l).toBeCloseTo(7560 - soon.current_volume_l!, 0);
  });

  it("gives a supply tank below its reorder level a delivery now, without waiting for a forecast", async () => {
    const below = item((await plan(14)).items, "below")!;
    expect(below).toMatchObject({ status: "due_now", action: "deliver", days_to_due: 0, limit_at: null });
    // Computed: 7 560 − 0.6 m × 3 000 L/m = 5 760 L.
    expect(below.volume_l).toBeCloseTo(5760, -1);
  });

  it("gives a sump the time until its pump-out level, its overflow and the volume to pump out", async () => {
    const sump = item((await plan(14)).items, "sump")!;
    expect(sump).toMatchObject({ purpose: "sump", status: "due", action: "pump_out" });
    // Computed: (6 720 − 3 300) L / 600 L a day = 5.7 d; overflow at (8 400 − 3 300) / 600 = 8.5 d; 3 300 − 840 = 2 460 L to pump out.
    near(sump.due_at, END.getTime() + 5.7 * DAY, 15 * 60_000);
    near(sump.limit_at, END.getTime() + 8.5 * DAY, 15 * 60_000);
    expect(sump.volume_l).toBeCloseTo(2460, -1);
  });

  it("lists a reserve only below its minimum, to top up to its kept-full level", async () => {
    const { items, unplanned } = await plan(90);
    const low = item(items, "reserveLow")!;
    expect(low).toMatchObject({ purpose: "reserve", status: "due_now", action: "top_up" });
    // Computed: 90 % of 8 400 = 7 560 L − 1.8 m × 3 000 L/m = 2 160 L.
    expect(low.volume_l).toBeCloseTo(2160, -1);
    for (const key of ["reserveFull", "process"] as const) {
      expect(item(items, key)).toBeUndefined();
      expect(unplanned.find((u) => u.asset_id === tanks[key].tank.id)).toBeUndefined();
    }
  });

  it("lists a stuck or silent tank as needing a check with the reason, never scheduled", async () => {
    const { items } = await plan(14);
    const stuck = item(items, "stuck")!;
    expect(stuck).toMatchObject({ status: "needs_check", action: null, due_at: null, days_to_due: null, limit_at: null, volume_l: null });
    expect(stuck.checks).toEqual([expect.objectContaining({ code: "flag", text: "Sensor flagged stuck" })]);
    const stale = item(items, "stale")!;
    expect(stale).toMatchObject({ status: "needs_check", due_at: null, volume_l: null });
    expect(stale.checks).toEqual([expect.objectContaining({ code: "stale", text: "No value for 5 h (expected every 60 min)" })]);
  });

  it("gives no dates from 20 h of history, and says why apart from the plan", async () => {
    const { items, unplanned } = await plan(90);
    expect(item(items, "short")).toBeUndefined();
    const short = unplanned.find((u) => u.asset_id === tanks.short.tank.id)!;
    expect(short.status).toBe("not_ready");
    expect(short.reason).toMatch(/^Needs 48 h of level history since the last refill; there are 20 h so far\.$/);
    // The stored projection says the same: not ready, no dates.
    const [row] = await sql(`SELECT status, ready, due_at, limit_at FROM tank_forecasts WHERE asset_id = $1`, [tanks.short.tank.id]);
    expect(row).toMatchObject({ status: "not_ready", ready: false, due_at: null, limit_at: null });
  });

  it("refuses a horizon that is not a whole number of days from 1 to 90", async () => {
    for (const bad of ["0", "91", "2.5", "soon"]) expect((await viewer.get(`/api/refill-plan?horizon_days=${bad}`)).status).toBe(422);
    expect((await anonymous().get("/api/refill-plan")).status).toBe(401);
  });

  it("exports the same plan as CSV for a viewer", async () => {
    const res = await viewer.get("/api/exports/refill-plan?horizon_days=14").buffer(true).parse((r, done) => {
      let text = "";
      r.on("data", (c: Buffer) => (text += c.toString("utf8")));
      r.on("end", () => done(null, text));
    });
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^text\/csv/);
    expect(res.headers["content-disposition"]).toMatch(/attachment; filename="refill-plan-14-days-/);
    const { header, rows } = csvByName(res.body as string);
    expect([...header].sort()).toEqual(
      ["action", "asset_id", "capacity_l", "current_volume_l", "days_to_due", "days_to_limit", "due_at", "fill_pct", "measured_at", "needs_check", "purpose", "safe_fill_pct", "site", "site_time_zone", "status", "tank", "volume_l"].sort(),
    );
    const ours = rows.filter((r) => keyOf(r.asset_id) !== undefined);
    const api = mine((await plan(14)).items);
    expect(ours.map((r) => r.asset_id)).toEqual(api.map((i) => i.asset_id));
    expect(ours.find((r) => r.asset_id === tanks.stale.tank.id)).toMatchObject({ status: "needs_check", due_at: "", needs_check: "No value for 5 h (expected every 60 min)" });
    expect(ours.find((r) => r.asset_id === tanks.sump.tank.id)).toMatchObject({ purpose: "sump", action: "pump_out" });
  });
});

describe("the same verdict on the tank, site and fleet screens", () => {
  it("shows each tank's plan from one source", async () => {
    const fleet = (await viewer.get("/api/overview").expect(200)).body;
    for (const key of ["soon", "short", "stuck", "process"] as const) {
      const t = tanks[key];
      const asset = (await viewer.get(`/api/assets/${t.tank.id}/overview`).expect(200)).body;
      const site = (await viewer.get(`/api/sites/${t.site.id}/overview`).expect(200)).body;
      const onSite = site.tanks.find((x: { id: string }) => x.id === t.tank.id);
      const inFleet = fleet.sites.find((s: { id: string }) => s.id === t.site.id).tanks.find((x: { id: string }) => x.id === t.tank.id);
      const verdict = (p: { status: string; due_at: string | null; reason: string | null; checks: { text: string }[] }) => ({ status: p.status, due_at: p.due_at, reason: p.reason, checks: p.checks.map((c) => c.text) });
      expect(verdict(onSite.plan), key).toEqual(verdict(asset.state.plan));
      expect(verdict(inFleet.plan), key).toEqual(verdict(asset.state.plan));
    }
    const short = (await viewer.get(`/api/assets/${tanks.short.tank.id}/overview`).expect(200)).body.state.plan;
    expect(short).toMatchObject({ status: "not_ready", due_at: null, limit_at: null, days_to_due: null, days_to_limit: null });
    const process = (await viewer.get(`/api/assets/${tanks.process.tank.id}/overview`).expect(200)).body.state.plan;
    expect(process).toMatchObject({ purpose: "process", status: "alarms_only", due_at: null });
  });
});

describe("a tank whose purpose changes", () => {
  it("is not planned by its old purpose, and is projected by its new one at the worker's next pass", async () => {
    const later = tanks.later;
    await admin.patch(`/api/assets/${later.tank.id}`).send({ purpose: "sump" }).expect(200);
    const before = (await viewer.get(`/api/assets/${later.tank.id}/overview`).expect(200)).body.state.plan;
    expect(before).toMatchObject({ purpose: "sump", status: "not_ready", due_at: null });
    await runWorkerOnce();
    // Falling 200 L a day: a sump that is not filling has nothing to pump out.
    const after = (await viewer.get(`/api/assets/${later.tank.id}/overview`).expect(200)).body.state.plan;
    expect(after).toMatchObject({ purpose: "sump", status: "not_due", reason: "The sump is not filling.", due_at: null });
  }, 120_000);
});
