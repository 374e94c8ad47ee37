import { beforeAll, describe, expect, it } from "vitest";
import { signedIn, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { runWorkerOnce } from "../support/worker";
import { sendReadings } from "./worker-support";

// The series route's compact answer (issue 16): the figures asked for in `fields`, column-wise, times
// as epoch milliseconds, rounded to 0.1 mm / 0.01 °C. Checked against the same buckets as items.
const T0 = Date.now() - 3 * 3600_000;

let viewer: Agent;
let tank: Awaited<ReturnType<typeof createTankWithDevice>>;

beforeAll(async () => {
  const admin = await signedIn("admin@halftrip.test");
  viewer = await signedIn("viewer@halftrip.test");
  tank = await createTankWithDevice(admin);
  // One reading every 10 minutes for 2.5 hours, echoes between 5 and 12 ms.
  await sendReadings(tank.apiKey, Array.from({ length: 15 }, (_, i) => ({ seq: i + 1, channel: 0, at: new Date(T0 + i * 600_000).toISOString(), echo_us: 5000 + i * 500 })));
  await runWorkerOnce();
});

describe("GET /api/assets/{id}/series?fields=", () => {
  it("answers the chosen figures column-wise, rounded, bucket for bucket as the items", async () => {
    const period = `from=${encodeURIComponent(new Date(T0 - 3600_000).toISOString())}&to=${encodeURIComponent(new Date().toISOString())}&bucket=1h`;
    const items = (await viewer.get(`/api/assets/${tank.tank.id}/series?${period}`).expect(200)).body.items as Record<string, number | string | null>[];
    const res = await viewer.get(`/api/assets/${tank.tank.id}/series?${period}&fields=level_m,air_temp_c,n`).expect(200);
    expect(res.body.items).toBeUndefined();
    const { columns } = res.body as { columns: Record<string, (number | null)[]> };
    expect(Object.keys(columns).sort()).toEqual(["air_temp_c", "at", "level_m", "n"]);
    expect(items.length).toBeGreaterThanOrEqual(3);
    expect(columns.at).toEqual(items.map((i) => Date.parse(i.at as string)));
    expect(columns.n).toEqual(items.map((i) => i.n));
    items.forEach((item, i) => {
      // Rounded to 0.1 mm and 0.01 °C: within half of that of the unrounded mean, with at most 4 and 2 decimals.
      expect(Math.abs((columns.level_m[i] as number) - (item.level_m as number))).toBeLessThanOrEqual(0.00005);
      expect(Math.abs((columns.air_temp_c[i] as number) - (item.air_temp_c as number))).toBeLessThanOrEqual(0.005);
      expect(String(columns.level_m[i])).toMatch(/^-?\d+(\.\d{1,4})?$/);
      expect(String(columns.air_temp_c[i])).toMatch(/^-?\d+(\.\d{1,2})?$/);
    });
  });

  it("refuses a field it does not know with 422 naming the field list", async () => {
    const res = await viewer.get(`/api/assets/${tank.tank.id}/series?fields=level_m,colour`).expect(422);
    expect(JSON.stringify(res.body)).toMatch(/fields/);
  });
});
