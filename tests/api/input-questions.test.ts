import { beforeAll, describe, expect, it } from "vitest";
import { signedIn, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { sql } from "../support/db";

// Issue 15 §6, questions before storing: a sensor mounted inside the tank or beyond its range, a
// strapping table with its own capacity, and a temperature sample that looks like °F in a °C file.
let admin: Agent;
let fleet: Awaited<ReturnType<typeof createTankWithDevice>>;
beforeAll(async () => {
  admin = await signedIn("admin@halftrip.test");
  fleet = await createTankWithDevice(admin);
});

const tank = (extra: Record<string, unknown>) => ({
  site_id: fleet.site.id,
  kind: "tank",
  name: `Tank ${Math.random().toString(36).slice(2, 7)}`,
  ...extra,
});

describe("sensor mounting", () => {
  it("refuses a sensor face below the tank's top, saying why", async () => {
    // A face 1.5 m above the bottom of a 3 m tank sits inside it.
    const res = await admin.post("/api/assets").send(tank({ mount_height_m: 1.5, geometry: { shape: "rectangular", length_m: 2, width_m: 1, height_m: 3 } }));
    expect(res.status).toBe(422);
    expect(res.body.fields.mount_height_m).toBe(
      "A sensor face 1.500 m above the bottom sits inside a tank 3.000 m high, and levels above it could not be measured. The mounting height counts from the tank bottom to the sensor face.",
    );
    // The same on an edit of a tank that exists.
    const moved = await admin.patch(`/api/assets/${fleet.tank.id}`).send({ mount_height_m: 2 });
    expect(moved.status).toBe(422);
    expect(moved.body.fields.mount_height_m).toMatch(/inside a tank 2\.800 m high/);
  });

  it("saves a tank bottom beyond the channel's range with a warning naming the levels that will not read", async () => {
    // The channel of tests/support/fleet.ts measures up to 4 m (the default range); a face 4.5 m up
    // leaves the lowest 0.5 m beyond it (4.5 − 4 = 0.5, by hand).
    const res = await admin.patch(`/api/assets/${fleet.tank.id}`).send({ mount_height_m: 4.5 });
    expect(res.status).toBe(200);
    expect(res.body.mount_height_m).toBe(4.5);
    expect(res.body.warnings).toEqual([
      { field: "mount_height_m", message: 'The tank bottom is 4.500 m from the sensor, beyond its 4.000 m range: levels below 0.500 m will read "no echo".' },
    ]);
    const audit = (await admin.get(`/api/audit?entity_id=${fleet.tank.id}`).expect(200)).body.items;
    expect(audit[0]).toMatchObject({ action: "asset.update", details: { mount_height_m: 4.5, warnings: [expect.stringMatching(/no echo/)] } });
    const back = await admin.patch(`/api/assets/${fleet.tank.id}`).send({ mount_height_m: 3 });
    expect(back.body.warnings).toEqual([]);
    // A rename asks nothing about the mounting.
    expect((await admin.patch(`/api/assets/${fleet.tank.id}`).send({ name: `${fleet.tank.name} (north)` })).body.warnings).toEqual([]);
  });

  it("accepts capacity_l with a strapping table, above the table's last row", async () => {
    const res = await admin.post("/api/assets").send(
      tank({ mount_height_m: 2.2, capacity_l: 2000, geometry: { shape: "strapping", points: [{ level_m: 0, volume_l: 0 }, { level_m: 1, volume_l: 800 }, { level_m: 2, volume_l: 1700 }] } }),
    );
    expect(res.status).toBe(201);
    expect(res.body.capacity_l).toBe(2000);
    const below = await admin.post("/api/assets").send(
      tank({ mount_height_m: 2.2, capacity_l: 1500, geometry: { shape: "strapping", points: [{ level_m: 0, volume_l: 0 }, { level_m: 2, volume_l: 1700 }] } }),
    );
    expect(below.status).toBe(422);
    expect(below.body.fields.capacity_l).toMatch(/at least the table's largest volume, 1700 L/);
  });
});

async function uploadTemperatures(siteId: string, csv: string) {
  const body = Buffer.from(csv, "utf8");
  const created = await admin.post("/api/imports").send({ kind: "temperature", target_id: siteId, file_name: "air.csv", size_bytes: body.length }).expect(201);
  return (await admin.put(`/api/imports/${created.body.id}/file`).set("Content-Type", "text/csv").send(body).expect(200)).body;
}

describe("temperature samples that look like °F", () => {
  it("stores the file as written, lists the sample far from its neighbours, and reads it as °F when the operator says so", async () => {
    const { site } = await createTankWithDevice(admin);
    const hour = 3_600_000;
    const t0 = Date.now() - 10 * hour;
    const temps = [10, 9.5, 9, 52, 8, 7.5, 7];
    const csv = ["at,air_temp_c", ...temps.map((c, i) => `${new Date(t0 + i * hour).toISOString()},${c}`)].join("\n");
    const done = await uploadTemperatures(site.id, csv);
    expect(done.status).toBe("imported");
    expect(done.rows_imported).toBe(7);
    expect(done.message).toMatch(/1 value looks questionable/);
    // 52 is on line 5 (the header is line 1). Read as °F it is (52 − 32) × 5/9 = 100/9 = 11.1 °C (computed from
    // the Fahrenheit scale's definition: 32 °F at the ice point, 180 °F between ice and steam points, 100 K).
    expect(done.questions).toHaveLength(1);
    const q = done.questions[0];
    expect(q).toMatchObject({ line: 5, value: 52, looks_like_fahrenheit: true });
    expect(q.as_celsius).toBeCloseTo(100 / 9, 10);
    expect(q.message).toMatch(/looks like °F \(11\.1 °C\)/);
    // Its neighbours 9.5, 9, 8, 7.5 have the median (9 + 8)/2 = 8.5 °C (by hand).
    expect(q.message).toMatch(/about 8\.5 °C/);
    const stored = async () => (await sql<{ air_temp_c: number }>(`SELECT air_temp_c FROM temperature_samples WHERE site_id = $1 AND at = $2`, [site.id, q.at]))[0].air_temp_c;
    expect(await stored()).toBe(52);

    const operator = await signedIn("operator@halftrip.test");
    expect((await operator.post(`/api/imports/${done.id}/read-as-fahrenheit`).send({ lines: [5] })).status).toBe(403);
    expect((await admin.post(`/api/imports/${done.id}/read-as-fahrenheit`).send({ lines: [4] })).status).toBe(422);
    const answered = await admin.post(`/api/imports/${done.id}/read-as-fahrenheit`).send({ lines: [5] });
    expect(answered.status).toBe(200);
    expect(answered.body.questions[0].converted_at).toEqual(expect.any(String));
    expect(await stored()).toBeCloseTo(100 / 9, 10);
    expect((await admin.post(`/api/imports/${done.id}/read-as-fahrenheit`).send({ lines: [5] })).status).toBe(409);
    const audit = (await admin.get(`/api/audit?entity_id=${site.id}`).expect(200)).body.items;
    expect(audit[0]).toMatchObject({ action: "import.temperature.read_as_fahrenheit", details: { samples: [{ line: 5, written: 52 }] } });
  });

  it("asks nothing of a file that only follows the day's course", async () => {
    const { site } = await createTankWithDevice(admin);
    const t0 = Date.now() - 12 * 3_600_000;
    const csv = ["at,air_temp_c", ...[4, 6, 9, 12, 15, 17, 18, 17, 14, 11, 8].map((c, i) => `${new Date(t0 + i * 3_600_000).toISOString()},${c}`)].join("\n");
    const done = await uploadTemperatures(site.id, csv);
    expect(done.status).toBe("imported");
    expect(done.questions).toEqual([]);
  });
});
