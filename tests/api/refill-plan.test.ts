import { beforeAll, describe, expect, it } from "vitest";
import { anonymous, signedIn, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { runWorkerOnce } from "../support/worker";
import { csvByName } from "../support/csv";
import { fallingLevel, sendEchoReadings } from "./calibration-readings";

// Issue 6 item 9: tanks that reach their reorder level within the horizon, soonest first, with the
// volume to deliver to reach safe fill; viewers see it and export it.
let admin: Agent;
let viewer: Agent;
type Made = Awaited<ReturnType<typeof createTankWithDevice>>;
const tanks: Record<"soon" | "later" | "below" | "steady", Made> = {} as never;

// The tank of tests/support/fleet.ts: 2 m × 1.5 m floor (3 m² → 3 000 L a metre), 8 400 L, sensor 3 m
// above the bottom, reorder at 25 % (2 100 L, 0.7 m), safe fill 90 % (7 560 L) — by hand.
const MOUNT = 3;

beforeAll(async () => {
  admin = await signedIn("admin@halftrip.test");
  viewer = await signedIn("viewer@halftrip.test");
  for (const key of ["soon", "later", "below", "steady"] as const) tanks[key] = await createTankWithDevice(admin);
  // Falling 0.1 m in 12 h (0.2 m a day) from 1.0 m: 0.7 m in about a day and a half.
  await sendEchoReadings(tanks.soon.apiKey, fallingLevel(MOUNT, 12, 1.0, 0.9));
  // Falling 0.05 m in 12 h (0.1 m a day) from 1.5 m: 0.7 m in about 7.5 days.
  await sendEchoReadings(tanks.later.apiKey, fallingLevel(MOUNT, 12, 1.5, 1.45));
  // Already below the reorder level, and steady.
  await sendEchoReadings(tanks.below.apiKey, fallingLevel(MOUNT, 12, 0.6, 0.6));
  // Steady well above it: never due.
  await sendEchoReadings(tanks.steady.apiKey, fallingLevel(MOUNT, 12, 2.0, 2.0));
  await runWorkerOnce();
});

const mine = (items: { asset_id: string }[]) => {
  const ids = new Map(Object.entries(tanks).map(([key, t]) => [t.tank.id, key]));
  return items.filter((i) => ids.has(i.asset_id)).map((i) => ids.get(i.asset_id));
};

describe("GET /api/refill-plan", () => {
  it("lists the tanks due within the horizon, soonest first", async () => {
    const plan = (await viewer.get("/api/refill-plan?horizon_days=14").expect(200)).body;
    expect(mine(plan.items)).toEqual(["below", "soon", "later"]);
    const dues = plan.items.map((i: { due_at: string }) => i.due_at);
    expect([...dues].sort()).toEqual(dues);
    const short = (await viewer.get("/api/refill-plan?horizon_days=3").expect(200)).body;
    expect(mine(short.items)).toEqual(["below", "soon"]);
  });

  it("says why each is due and how much to deliver to reach safe fill", async () => {
    const plan = (await viewer.get("/api/refill-plan?horizon_days=14").expect(200)).body;
    const below = plan.items.find((i: { asset_id: string }) => i.asset_id === tanks.below.tank.id);
    expect(below.reason).toBe("below_reorder");
    expect(below.days_to_reorder).toBe(0);
    // 7 560 L − 0.6 m × 3 000 L/m = 5 760 L (by hand); the sensor's echo rounding leaves well under 5 L.
    expect(below.deliver_l).toBeCloseTo(5760, -1);
    const soon = plan.items.find((i: { asset_id: string }) => i.asset_id === tanks.soon.tank.id);
    expect(soon.reason).toBe("forecast");
    // 0.2 m a day over the last 0.2 m to the reorder level: about a day and a half (by hand).
    expect(soon.days_to_reorder).toBeGreaterThan(0.7);
    expect(soon.days_to_reorder).toBeLessThan(2);
    expect(soon.deliver_l).toBeCloseTo(7560 - soon.current_volume_l, 6);
    expect(soon.current_volume_l).toBeCloseTo(2700, -2);
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
    expect([...header].sort()).toEqual(["asset_id", "capacity_l", "current_volume_l", "days_to_empty", "days_to_reorder", "deliver_l", "due_at", "fill_pct", "measured_at", "reason", "safe_fill_pct", "site", "site_time_zone", "tank"]);
    const order = rows.map((r) => r.asset_id).filter((id) => Object.values(tanks).some((t) => t.tank.id === id));
    expect(order).toEqual([tanks.below.tank.id, tanks.soon.tank.id, tanks.later.tank.id]);
  });
});
