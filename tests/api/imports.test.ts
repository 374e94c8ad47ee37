import { beforeAll, describe, expect, it } from "vitest";
import { anonymous, signedIn, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { createOtherOrganisation, sql } from "../support/db";
import { signInAgent } from "../support/session";
import { MAX_UPLOAD_BYTES } from "@/lib/validations/import";

// Issue 6 item 7 and "Bad input": CSV imports stream, report errors by line, and import nothing from a
// file with errors unless the good rows are asked for.
let admin: Agent;
let fleet: Awaited<ReturnType<typeof createTankWithDevice>>;
// Dips are refused before a tank was added (or had data): the tanks these files dip were added two days ago.
async function tankAddedDaysAgo() {
  const f = await createTankWithDevice(admin);
  await sql(`UPDATE assets SET created_at = now() - interval '2 days' WHERE id = $1`, [f.tank.id]);
  return f;
}

beforeAll(async () => {
  admin = await signedIn("admin@halftrip.test");
  fleet = await tankAddedDaysAgo();
});

async function upload(kind: string, targetId: string, csv: string, mode: "all_or_nothing" | "good_rows" = "all_or_nothing", agent = admin) {
  const body = Buffer.from(csv, "utf8");
  const created = await agent.post("/api/imports").send({ kind, target_id: targetId, file_name: `${kind}.csv`, size_bytes: body.length, mode });
  expect(created.status).toBe(201);
  expect(created.body.status).toBe("waiting");
  const done = await agent.put(`/api/imports/${created.body.id}/file`).set("Content-Type", "text/csv").send(body);
  expect(done.status).toBe(200);
  return done.body;
}

const dipCount = async (assetId: string) => Number((await sql<{ n: string }>(`SELECT count(*) AS n FROM manual_dips WHERE asset_id = $1`, [assetId]))[0].n);
// One reference instant for the whole file, so rows meant to share a time really do.
const NOW = Date.now();
const iso = (msAgo: number) => new Date(NOW - msAgo).toISOString();

describe("strapping table", () => {
  it("replaces the tank's geometry and capacity", async () => {
    const { tank } = await createTankWithDevice(admin);
    const done = await upload("strapping", tank.id, "level_m,volume_l\r\n0,0\r\n0.5,400\r\n1.0,1000\r\n2.0,2600\r\n");
    expect(done.status).toBe("imported");
    expect(done.rows_imported).toBe(4);
    expect(done.lines_read).toBe(5);
    const asset = (await admin.get(`/api/assets/${tank.id}`).expect(200)).body;
    expect(asset.geometry).toEqual({ shape: "strapping", points: [{ level_m: 0, volume_l: 0 }, { level_m: 0.5, volume_l: 400 }, { level_m: 1, volume_l: 1000 }, { level_m: 2, volume_l: 2600 }] });
    // A strapping table's capacity is its top row (linear interpolation between rows, API MPMS Ch. 2.2A practice).
    expect(asset.capacity_l).toBeCloseTo(2600, 6);
    const audit = (await admin.get(`/api/audit?entity_id=${tank.id}`).expect(200)).body.items.map((a: { action: string }) => a.action);
    expect(audit).toEqual(expect.arrayContaining(["import.strapping", "asset.update"]));
    expect(Number((await sql<{ n: string }>(`SELECT count(*) AS n FROM recompute_requests WHERE asset_id = $1`, [tank.id]))[0].n)).toBe(1);
  });

  it("refuses a table whose volume falls as the level rises, naming the line, and keeps the old shape", async () => {
    const { tank } = await createTankWithDevice(admin);
    const done = await upload("strapping", tank.id, "level_m,volume_l\n0,0\n1,900\n1.5,800\n2,1500\n");
    expect(done.status).toBe("rejected");
    expect(done.errors).toEqual([{ line: 4, message: expect.stringMatching(/cannot fall/) }]);
    expect((await admin.get(`/api/assets/${tank.id}`)).body.geometry.shape).toBe("rectangular");
  });
});

describe("all or nothing", () => {
  const bad = [
    "at,level_m,note",
    `${iso(3_600_000)},1.20,first`,
    `${iso(3_000_000)},1.1x,typo`,
    `2026-13-40T10:00:00Z,1.0,bad date`,
    `${iso(2_400_000)},"1,05",decimal comma`,
    `${iso(3_600_000)},1.25,same time as line 2`,
    `${iso(1_800_000)},0.95,fine`,
    `${iso(1_200_000)},1.0`,
  ].join("\n");

  it("imports nothing from a file with errors and lists each by line", async () => {
    const { tank } = await tankAddedDaysAgo();
    const done = await upload("dips", tank.id, bad);
    expect(done.status).toBe("rejected");
    expect(done.rows_imported).toBe(0);
    expect(done.message).toMatch(/nothing was imported/);
    expect(done.errors.map((e: { line: number }) => e.line)).toEqual([3, 4, 5, 6, 8]);
    const byLine = Object.fromEntries(done.errors.map((e: { line: number; message: string }) => [e.line, e.message]));
    expect(byLine[3]).toMatch(/level_m "1.1x" is not a number/);
    expect(byLine[4]).toMatch(/not a real date/);
    expect(byLine[5]).toMatch(/decimal comma/);
    expect(byLine[6]).toMatch(/repeats line 2/);
    expect(byLine[8]).toMatch(/2 fields where the header has 3/);
    expect(await dipCount(tank.id)).toBe(0);
  });

  it("imports the good rows when asked, and still lists the bad ones", async () => {
    const { tank } = await tankAddedDaysAgo();
    const done = await upload("dips", tank.id, bad, "good_rows");
    expect(done.status).toBe("partial");
    expect(done.rows_imported).toBe(2);
    expect(done.error_count).toBe(5);
    expect(await dipCount(tank.id)).toBe(2);
  });

  it("rolls back rows already written when a later batch finds a stored duplicate", async () => {
    // 1 500 readings: the first batch of 1 000 is written before line 1 502 repeats a stored seq.
    const { device, apiKey } = await createTankWithDevice(admin);
    const first = await anonymous().post("/api/v1/readings").set("Authorization", `Bearer ${apiKey}`).send({ readings: [{ seq: 5, channel: 0, echo_us: 5831, at: iso(86_400_000) }] });
    expect(first.status).toBe(202);
    const rows = Array.from({ length: 1500 }, (_, i) => `${1000 + i},${iso(80_000_000 - i * 1000)},0,5831`);
    rows.push(`5,${iso(70_000_000)},0,5800`);
    const done = await upload("readings", device.id, ["seq,at,channel,echo_us", ...rows].join("\n"));
    expect(done.status).toBe("rejected");
    expect(done.errors).toEqual([{ line: 1502, message: "seq 5 on channel 0 is already stored for this device" }]);
    expect(Number((await sql<{ n: string }>(`SELECT count(*) AS n FROM readings WHERE device_id = $1`, [device.id]))[0].n)).toBe(1);
    expect(Number((await sql<{ n: string }>(`SELECT count(*) AS n FROM reading_keys WHERE device_id = $1`, [device.id]))[0].n)).toBe(1);
  });
});

describe("backfill readings and temperature series", () => {
  it("stores readings through the device API's path and queues them for the worker", async () => {
    const { device } = await createTankWithDevice(admin);
    const csv = ["seq,at,channel,echo_us,air_temp_c", `1,${iso(7_200_000)},0,5831.5,11.5`, `2,${iso(3_600_000)},0,5800,`].join("\n");
    const done = await upload("readings", device.id, csv);
    expect(done.status).toBe("imported");
    const stored = await sql<{ seq: string; echo_us: number; air_temp_c: number | null; queued: boolean }>(
      `SELECT r.seq, r.echo_us, r.air_temp_c, EXISTS (SELECT 1 FROM reading_queue q WHERE q.reading_id = r.id) AS queued FROM readings r WHERE r.device_id = $1 ORDER BY r.seq`,
      [device.id],
    );
    expect(stored).toEqual([
      { seq: "1", echo_us: 5831.5, air_temp_c: 11.5, queued: true },
      { seq: "2", echo_us: 5800, air_temp_c: null, queued: true },
    ]);
    // A backfill is not a sign of life: last seen stays as it was.
    expect((await sql<{ last_seen_at: Date | null }>(`SELECT last_seen_at FROM devices WHERE id = $1`, [device.id]))[0].last_seen_at).toBeNull();
  });

  it("checks each reading against the device: its channels and its profile's signal", async () => {
    const { device } = await createTankWithDevice(admin);
    const done = await upload("readings", device.id, ["seq,at,channel,echo_us", `1,${iso(60_000)},3,5831`, `2,${iso(60_000)},0,-4`].join("\n"));
    expect(done.status).toBe("rejected");
    expect(done.errors[0]).toEqual({ line: 2, message: expect.stringMatching(/channel 3 is not configured/) });
    expect(done.errors[1]).toEqual({ line: 3, message: expect.stringMatching(/echo_us must be above 0/) });
    const wrongProfile = await upload("readings", device.id, ["seq,at,channel,ticks", `1,${iso(60_000)},0,100`].join("\n"));
    expect(wrongProfile.message).toMatch(/wrong columns — missing echo_us; unknown "ticks"/);
  });

  it("stores a site's temperature series as imported samples and files recomputes", async () => {
    const { site, device } = await createTankWithDevice(admin);
    const twoHoursAgo = iso(7_200_000);
    const done = await upload("temperature", site.id, ["at,air_temp_c", `${twoHoursAgo},4.5`, `${iso(3_600_000)},5.25`].join("\n"));
    expect(done.status).toBe("imported");
    const samples = await sql<{ air_temp_c: number; source: string }>(`SELECT air_temp_c, source FROM temperature_samples WHERE site_id = $1 ORDER BY at`, [site.id]);
    expect(samples).toEqual([{ air_temp_c: 4.5, source: "import" }, { air_temp_c: 5.25, source: "import" }]);
    const recomputes = await sql<{ reason: string }>(`SELECT reason FROM recompute_requests WHERE channel_id = $1`, [device.channels[0].id]);
    expect(recomputes).toEqual([{ reason: "temperature_import" }]);
    const again = await upload("temperature", site.id, ["at,air_temp_c", `${iso(86_400_000)},3`, `${twoHoursAgo},4.5`].join("\n"));
    expect(again.status).toBe("rejected");
    expect(again.errors[0]).toEqual({ line: 3, message: expect.stringMatching(/already stored/) });
  });
});

describe("bad files", () => {
  it("names a wrong delimiter and wrong columns on line 1", async () => {
    const semicolons = await upload("dips", fleet.tank.id, "at;level_m\n2026-01-01T00:00:00Z;1.2\n");
    expect(semicolons.status).toBe("rejected");
    expect(semicolons.message).toMatch(/^Line 1: the columns are separated by semicolons/);
    const columns = await upload("dips", fleet.tank.id, "time,level\n2026-01-01T00:00:00Z,1.2\n");
    expect(columns.message).toMatch(/^Line 1: wrong columns — missing at, level_m; unknown "time", "level"/);
    const empty = await upload("dips", fleet.tank.id, "at,level_m\n");
    expect(empty.message).toBe("The file has a header but no rows.");
  });

  it("names a date without a zone and a file that is not UTF-8", async () => {
    const zone = await upload("dips", fleet.tank.id, "at,level_m\n2026-01-01 10:00,1.2\n");
    expect(zone.errors[0].message).toMatch(/has no time zone/);
    const latin1 = Buffer.from([...Buffer.from("at,level_m,note\n2026-01-01T10:00:00Z,1.2,"), 0xe9, 0x0a]);
    const created = await admin.post("/api/imports").send({ kind: "dips", target_id: fleet.tank.id, file_name: "latin1.csv", size_bytes: latin1.length });
    const done = await admin.put(`/api/imports/${created.body.id}/file`).set("Content-Type", "text/csv").send(latin1).expect(200);
    expect(done.body.message).toMatch(/not UTF-8/);
  });

  it("refuses a 50 MB file before it is sent, and a second file for one upload", async () => {
    const big = await admin.post("/api/imports").send({ kind: "dips", target_id: fleet.tank.id, file_name: "big.csv", size_bytes: 50 * 1024 * 1024 });
    expect(big.status).toBe(422);
    expect(big.body.message).toMatch(`larger than ${MAX_UPLOAD_BYTES / (1024 * 1024)} MB`);
    const created = await admin.post("/api/imports").send({ kind: "dips", target_id: fleet.tank.id, file_name: "x.csv", size_bytes: 10 });
    await admin.put(`/api/imports/${created.body.id}/file`).set("Content-Type", "text/csv").send("at,level_m\n").expect(200);
    const again = await admin.put(`/api/imports/${created.body.id}/file`).set("Content-Type", "text/csv").send("at,level_m\n");
    expect(again.status).toBe(409);
  });
});

describe("history, roles and scoping", () => {
  it("keeps uploads in a history, newest first", async () => {
    const done = await upload("dips", fleet.tank.id, `at,level_m\n${iso(600_000)},1.1\n`);
    const history = (await admin.get("/api/imports").expect(200)).body.items;
    expect(history[0]).toMatchObject({ id: done.id, kind: "dips", status: "imported", rows_imported: 1, target_label: fleet.tank.name, by: expect.any(String) });
    expect(history[0].errors).toBeUndefined();
  });

  it.each(["operator@halftrip.test", "technician@halftrip.test", "viewer@halftrip.test"])("refuses %s", async (email) => {
    const agent = await signedIn(email);
    expect((await agent.get("/api/imports")).status).toBe(403);
    expect((await agent.post("/api/imports").send({ kind: "dips", target_id: fleet.tank.id, file_name: "x.csv", size_bytes: 10 })).status).toBe(403);
  });

  it("does not reach another organisation's tank or uploads", async () => {
    const other = await createOtherOrganisation();
    const { agent } = await signInAgent(other.adminEmail, other.password);
    const res = await agent.post("/api/imports").send({ kind: "dips", target_id: fleet.tank.id, file_name: "x.csv", size_bytes: 10 });
    expect(res.status).toBe(422);
    expect(res.body.fields.target_id).toMatch(/No such tank/);
    const mine = await admin.post("/api/imports").send({ kind: "dips", target_id: fleet.tank.id, file_name: "x.csv", size_bytes: 10 });
    expect((await agent.get(`/api/imports/${mine.body.id}`)).status).toBe(404);
    expect((await agent.put(`/api/imports/${mine.body.id}/file`).set("Content-Type", "text/csv").send("at,level_m\n")).status).toBe(404);
  });
});
