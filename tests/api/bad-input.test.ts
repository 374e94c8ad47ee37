import { describe, expect, it } from "vitest";
import { createTankWithDevice } from "../support/fleet";
import { sql } from "../support/db";
import { anonymous, signedIn } from "../support/session";

// Issue 14, hole 6: a NUL character or a lone surrogate in names, reasons, firmware, invite names or CSV
// cells answered 500 (or was stored mangled), and dates before 4713 BC in from/to answered 500.
const NUL = "Tank\u0000 7";
const LONE = "Tank \ud800 7";

describe("bad text and dates answer 422 naming the field", () => {
  it.each([
    ["NUL", NUL],
    ["lone surrogate", LONE],
  ])("refuses a %s in a site name, an invite name and a firmware string", async (_what, bad) => {
    const admin = await signedIn("admin@halftrip.test");
    const site = await admin.post("/api/sites").send({ name: bad, time_zone: "UTC" });
    expect(site.status).toBe(422);
    expect(site.body.fields).toHaveProperty("name");

    const email = `nul-${Date.now()}@example.org`;
    const invite = await admin.post("/api/users").send({ email, name: bad, role: "viewer" });
    expect(invite.status).toBe(422);
    expect(invite.body.fields).toHaveProperty("name");
    expect(await sql(`SELECT 1 FROM users WHERE email = $1`, [email])).toHaveLength(0);

    const fleet = await createTankWithDevice(admin);
    const device = await admin.patch(`/api/devices/${fleet.device.id}`).send({ firmware: bad });
    expect(device.status).toBe(422);
    expect(device.body.fields).toHaveProperty("firmware");
  });

  it("refuses a NUL in a shelve reason and in an acknowledge comment", async () => {
    const admin = await signedIn("admin@halftrip.test");
    const id = "00000000-0000-4000-8000-000000000000";
    const shelve = await admin.post(`/api/alarms/${id}/shelve`).send({ reason: NUL, duration_min: 10 });
    expect(shelve.status).toBe(422);
    expect(shelve.body.fields).toHaveProperty("reason");
    const ack = await anonymous().post("/api/alarms/ack-link").send({ token: "x".repeat(20), comment: LONE });
    expect(ack.status).toBe(422);
    expect(ack.body.fields).toHaveProperty("comment");
  });

  it("reports a NUL in a CSV cell as a line error, not a 500", async () => {
    const admin = await signedIn("admin@halftrip.test");
    const fleet = await createTankWithDevice(admin);
    // Dated now: a dip before the tank was added would be refused for its date before its note is read.
    const csv = `at,level_m,note\n${new Date().toISOString()},1.2,bad\u0000note\n`;
    const body = Buffer.from(csv, "utf8");
    const created = await admin.post("/api/imports").send({ kind: "dips", target_id: fleet.tank.id, file_name: "nul.csv", size_bytes: body.length });
    const done = await admin.put(`/api/imports/${created.body.id}/file`).set("Content-Type", "text/csv").send(body);
    expect(done.status).toBe(200);
    expect(done.body.status).toBe("rejected");
    expect(JSON.stringify(done.body.errors)).toMatch(/note/);
  });

  it.each([
    ["/api/alarms?from=-005000-01-01T00:00:00Z", "from"],
    ["/api/alarms?to=2999-01-01T00:00:00Z", "to"],
    ["/api/alarm-health?from=1900-01-01T00:00:00Z", "from"],
    ["/api/exports/alarms?from=0001-01-01&to=0001-06-01", "from"],
  ])("answers 422 for an out-of-range date in %s", async (path, field) => {
    const admin = await signedIn("admin@halftrip.test");
    const res = await admin.get(path);
    expect(res.status).toBe(422);
    expect(res.body.fields).toHaveProperty(field);
  });

  it("answers 422 for an out-of-range date in an asset's measurements and series", async () => {
    const admin = await signedIn("admin@halftrip.test");
    const fleet = await createTankWithDevice(admin);
    const series = await admin.get(`/api/assets/${fleet.tank.id}/series?from=-004714-11-24T00:00:00Z&to=2026-01-01T00:00:00Z`);
    expect(series.status).toBe(422);
    const measurements = await admin.get(`/api/channels/${fleet.device.channels[0].id}/measurements?from=0100-01-01T00:00:00Z`);
    expect(measurements.status).toBe(422);
  });
});
