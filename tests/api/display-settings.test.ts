import bcrypt from "bcryptjs";
import { unit as mathUnit } from "mathjs";
import { beforeAll, describe, expect, it } from "vitest";
import { signInAgent, type Agent } from "../support/session";
import { createOtherOrganisation, sql } from "../support/db";
import { repeat, tankWithAlarms } from "../support/alarm-tank";
import { runWorkerOnce } from "../support/worker";
import { waitForMail } from "../support/mail-sink";
import { csvByName } from "../support/csv";

// Issue 15 §5: units and locale per organisation, overridable per user; the APIs stay SI. A US-customary
// organisation of its own, so no other test sees its settings.
let admin: Agent;
let adminEmail: string;
let technician: Agent;
let technicianId: string;
let organisationId: string;
let t: Awaited<ReturnType<typeof tankWithAlarms>>;
const NBSP = "\u00a0";

const text = (req: ReturnType<Agent["get"]>) =>
  req.buffer(true).parse((r, done) => {
    let body = "";
    r.on("data", (c: Buffer) => (body += c.toString("utf8")));
    r.on("end", () => done(null, body));
  });

beforeAll(async () => {
  const org = await createOtherOrganisation();
  organisationId = org.organisationId;
  adminEmail = org.adminEmail;
  admin = (await signInAgent(org.adminEmail, org.password)).agent;
  const techEmail = `tech-${organisationId.slice(0, 8)}@example.org`;
  [{ id: technicianId }] = await sql<{ id: string }>(
    `INSERT INTO users (organisation_id, email, name, role, status, password_hash) VALUES ($1, $2, 'Tech', 'technician', 'active', $3) RETURNING id`,
    [organisationId, techEmail, await bcrypt.hash(org.password, 4)],
  );
  technician = (await signInAgent(techEmail, org.password)).agent;
  const [{ id: adminId }] = await sql<{ id: string }>(`SELECT id FROM users WHERE email = $1`, [org.adminEmail]);
  expect((await admin.patch("/api/organisation/display-settings").send({ unit_system: "us", clock: "12h" })).status).toBe(200);
  // The H setpoint is 2.0 m (tests/support/alarm-tank.ts); a level of 2.2 m raises it.
  t = await tankWithAlarms(admin, admin, [adminId]);
  await t.send([...repeat(1.5, 6), ...repeat(2.2, 12)]);
  await runWorkerOnce();
}, 300_000);

describe("the settings", () => {
  it("are the organisation's for everyone until a user chooses their own, and each change is audited", async () => {
    const before = (await technician.get("/api/me/display-settings").expect(200)).body;
    expect(before).toEqual({
      organisation: { unit_system: "us", decimal_separator: ".", clock: "12h" },
      own: { unit_system: null, decimal_separator: null, clock: null },
      effective: { unit_system: "us", decimal_separator: ".", clock: "12h" },
    });
    const own = (await technician.patch("/api/me/display-settings").send({ decimal_separator: ",", clock: "24h" }).expect(200)).body;
    expect(own.effective).toEqual({ unit_system: "us", decimal_separator: ",", clock: "24h" });
    const back = (await technician.patch("/api/me/display-settings").send({ decimal_separator: null, clock: null }).expect(200)).body;
    expect(back.effective).toEqual(before.effective);
    const audit = await sql<{ action: string; entity_id: string }>(`SELECT action, entity_id FROM audit_log WHERE organisation_id = $1 AND action LIKE '%display%' ORDER BY id`, [organisationId]);
    expect(audit.map((a) => a.action)).toEqual(["organisation.display_settings", "user.display_preferences", "user.display_preferences"]);
    expect(audit[1].entity_id).toBe(technicianId);
  });

  it("refuses a non-admin's change of the organisation's, an unknown value and an unknown field", async () => {
    expect((await technician.patch("/api/organisation/display-settings").send({ unit_system: "si" })).status).toBe(403);
    const bad = await admin.patch("/api/organisation/display-settings").send({ unit_system: "imperial" });
    expect(bad.status).toBe(422);
    expect(bad.body.fields.unit_system).toMatch(/si .* or us/);
    expect((await technician.patch("/api/me/display-settings").send({ locale: "fr" })).status).toBe(422);
    expect((await technician.patch("/api/me/display-settings").send({})).status).toBe(422);
  });
});

describe("a US-customary organisation", () => {
  it("still reads and writes SI through the APIs", async () => {
    const overview = (await admin.get(`/api/sites/${t.site.id}/overview`).expect(200)).body;
    const body = JSON.stringify(overview);
    expect(body).toContain('"level_m"');
    expect(body).not.toMatch(/_ft"|_gal"/);
    const asset = (await admin.get(`/api/assets/${t.tank.id}`).expect(200)).body;
    expect(asset.mount_height_m).toBe(3);
  });

  it("e-mails alarm figures in feet and inches on a 12-hour clock", async () => {
    const mail = await waitForMail(adminEmail, (m) => m.subject.includes(t.tank.name));
    // 2.0 m = 6.5617 ft (1 ft = 0.3048 m exactly; mathjs agrees): without an uncertainty, to 0.01 ft.
    expect(mathUnit(2, "m").toNumber("ft")).toBeCloseTo(6.5617, 4);
    expect(mail.text).toContain(`Setpoint: 6.56${NBSP}ft`);
    const activation = /At activation: ([\d.]+)\u00a0ft ±\u00a0[\d.]+\u00a0in at .* (\d{1,2}):\d{2}\s[ap]m /.exec(mail.text);
    expect(activation).not.toBeNull();
    // The level the readings encode, 2.2 m = 7.218 ft (mathjs), to the digits its uncertainty allows.
    expect(Math.abs(Number(activation![1]) - mathUnit(2.2, "m").toNumber("ft"))).toBeLessThan(0.01);
  });

  it("exports measurements in ft, US gal and °F with the unit in each column's name, and SI columns on request", async () => {
    const range = `asset_ids=${t.tank.id}&from=${new Date(Date.now() - 3_600_000).toISOString()}&to=${new Date().toISOString()}`;
    const us = csvByName((await text(admin.get(`/api/exports/measurements?${range}`))).body as string);
    const si = csvByName((await text(admin.get(`/api/exports/measurements?${range}&units=si`))).body as string);
    const full = csvByName((await text(admin.get(`/api/exports/measurements?${range}&units=si&precision=full`))).body as string);
    expect(us.header).toEqual(expect.arrayContaining(["level_ft", "distance_ft", "volume_gal", "ullage_gal", "air_temp_f", "uncertainty_in"]));
    expect(us.header).not.toContain("level_m");
    expect(si.header).toEqual(expect.arrayContaining(["level_m", "volume_l", "air_temp_c", "uncertainty_m"]));
    const usOk = us.rows.filter((r) => r.status === "ok");
    const siOk = full.rows.filter((r) => r.status === "ok");
    expect(usOk.length).toBe(siOk.length);
    expect(usOk.length).toBeGreaterThan(10);
    for (const [u, s] of usOk.map((r, i) => [r, siOk[i]] as const)) {
      // Each figure is the SI one as computed, converted by mathjs, then rounded to the digits its own
      // uncertainty allows in that unit (here 0.01 ft or finer: within half of it).
      expect(Math.abs(Number(u.level_ft) - mathUnit(Number(s.level_m), "m").toNumber("ft"))).toBeLessThanOrEqual(0.005);
      // Four significant figures of about 1 700 gal: within half a gallon.
      expect(Math.abs(Number(u.volume_gal) - mathUnit(Number(s.volume_l), "L").toNumber("gallon"))).toBeLessThanOrEqual(0.5);
      // 20 °C = 68 °F (NIST SP 811, §4.2.1.1).
      expect(Number(u.air_temp_f)).toBe(68);
      // The standard uncertainty to two significant digits: within 5 % of the computed one.
      const uIn = mathUnit(Number(s.uncertainty_m), "m").toNumber("inch");
      expect(Math.abs(Number(u.uncertainty_in) - uIn)).toBeLessThanOrEqual(0.05 * uIn);
    }
  });

  it("exports the refill plan's volumes in US gallons and alarm values in feet", async () => {
    const plan = csvByName((await text(admin.get(`/api/exports/refill-plan?horizon_days=90`))).body as string);
    expect(plan.header).toEqual(expect.arrayContaining(["volume_gal", "current_volume_gal", "capacity_gal"]));
    expect(plan.header).not.toContain("capacity_l");
    const alarms = csvByName((await text(admin.get(`/api/exports/alarms?from=${new Date(Date.now() - 3_600_000).toISOString()}&to=${new Date().toISOString()}`))).body as string);
    const activation = alarms.rows.find((r) => r.event === "activated" && r.alarm_kind === "h");
    expect(activation).toBeDefined();
    expect(activation!.unit).toBe("ft");
    expect(Math.abs(Number(activation!.setpoint) - mathUnit(2, "m").toNumber("ft"))).toBeLessThan(1e-9);
  });
});
