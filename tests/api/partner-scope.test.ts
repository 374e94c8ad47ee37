import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import bcrypt from "bcryptjs";
import { beforeAll, describe, expect, it } from "vitest";
import { anonymous, signedIn, signInAgent, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { createOtherOrganisation, sql } from "../support/db";
import { firstLink, waitForMail } from "../support/mail-sink";
import { runWorkerOnce } from "../support/worker";

// Partner scope (PRODUCT.md "People and roles", docs/security.md): a viewer limited to chosen sites
// reads only those — every GET route handler, every id — and no viewer sees a staff e-mail address.
// Invites answer alike whether or not another organisation uses the address.

// Speed of sound in dry air at 20 °C (REFERENCES.md §1); the test tank's sensor face is 3 m up.
const C_20 = 343.215;
const MOUNT_M = 3;
const TECHNICIAN = "technician@halftrip.test";

type Fleet = Awaited<ReturnType<typeof createTankWithDevice>>;
let admin: Agent;
let operator: Agent;
let technician: Agent;
let partner: Agent;
let partnerId: string;
let assigned: Fleet & { alarmId: string };
let unassigned: Fleet & { alarmId: string };

/** A tank whose level stands above H for a minute, so the worker raises an alarm on it. */
async function tankInAlarm(technicianId: string): Promise<Fleet> {
  const fleet = await createTankWithDevice(admin, { device: { expected_interval_s: 3600 } });
  await operator.put(`/api/assets/${fleet.tank.id}/setpoints`).send({ setpoints: { h: { value: 2.0, deadband_m: 0.1, on_delay_s: 20, priority: "medium" } } }).expect(200);
  await operator.put(`/api/sites/${fleet.site.id}/on-call`).send({ user_ids: [technicianId] }).expect(200);
  const start = Date.now() - 80_000;
  // Round-trip echo time to a surface 2.4 m up: t = 2·(3 − 2.4)/c (REFERENCES.md §2).
  const readings = Array.from({ length: 7 }, (_, i) => ({ seq: i + 1, at: new Date(start + i * 10_000).toISOString(), channel: 0, echo_us: Math.round(((2 * (MOUNT_M - 2.4)) / C_20) * 1e7) / 10, air_temp_c: 20 }));
  await anonymous().post("/api/v1/readings").set("Authorization", `Bearer ${fleet.apiKey}`).send({ readings }).expect(202);
  return fleet;
}

async function alarmOf(fleet: Fleet): Promise<string> {
  const [row] = await sql<{ id: string }>(`SELECT id FROM alarms WHERE asset_id = $1`, [fleet.tank.id]);
  if (!row) throw new Error("the worker raised no alarm");
  return row.id;
}

beforeAll(async () => {
  [admin, operator, technician] = await Promise.all([signedIn("admin@halftrip.test"), signedIn("operator@halftrip.test"), signedIn(TECHNICIAN)]);
  const [tech] = await sql<{ id: string }>(`SELECT id FROM users WHERE email = $1`, [TECHNICIAN]);
  const [a, b] = [await tankInAlarm(tech.id), await tankInAlarm(tech.id)];
  await runWorkerOnce();
  assigned = { ...a, alarmId: await alarmOf(a) };
  unassigned = { ...b, alarmId: await alarmOf(b) };
  // Staff activity that carries an address: the technician acknowledges both alarms and dips both tanks.
  for (const f of [assigned, unassigned]) {
    await technician.post(`/api/alarms/${f.alarmId}/acknowledge`).send({ comment: "on my way" }).expect(200);
    await technician.post(`/api/assets/${f.tank.id}/dips`).send({ at: new Date(Date.now() - 30_000).toISOString(), level_m: 2.4, note: "tape" }).expect(201);
  }
  const email = `partner-${Date.now()}@example.org`;
  const [org] = await sql<{ organisation_id: string }>(`SELECT organisation_id FROM users WHERE email = 'admin@halftrip.test'`);
  const [row] = await sql<{ id: string }>(
    `INSERT INTO users (organisation_id, email, name, role, status, password_hash) VALUES ($1, $2, 'Delivery Partner', 'viewer', 'active', $3) RETURNING id`,
    [org.organisation_id, email, await bcrypt.hash("partner-password-1", 4)],
  );
  partnerId = row.id;
  const patched = await admin.patch(`/api/users/${partnerId}`).send({ site_ids: [assigned.site.id] });
  expect(patched.status).toBe(200);
  expect(patched.body.user.site_ids).toEqual([assigned.site.id]);
  partner = await signedIn(email, "partner-password-1");
}, 240_000);

// Every GET route handler under app/api, found on disk, so a new one cannot be left out of this walk.
function getRoutes(): string[] {
  const root = path.join(process.cwd(), "app/api");
  const found: string[] = [];
  const walk = (dir: string) => {
    for (const entry of readdirSync(dir, { withFileTypes: true })) {
      const full = path.join(dir, entry.name);
      if (entry.isDirectory()) walk(full);
      else if (entry.name === "route.ts" && /export const GET\b/.test(readFileSync(full, "utf8"))) found.push(path.relative(root, dir).split(path.sep).join("/"));
    }
  };
  walk(root);
  return found.sort();
}

// One range for the whole file, so a route's call for either site differs only in the site's ids.
const RANGE = `from=${new Date(Date.now() - 86_400_000).toISOString()}&to=${new Date(Date.now() + 3_600_000).toISOString()}`;
const range = () => RANGE;

/** For each GET route: how to call it for one fleet's objects, and what a viewer gets. */
function routeCalls(f: Fleet & { alarmId: string }): Record<string, { url: string; viewer: 200 | 403 } | "public"> {
  const channel = f.device.channels[0].id as string;
  return {
    "alarm-health": { url: `/api/alarm-health`, viewer: 200 },
    alarms: { url: `/api/alarms?state=active&page_size=200`, viewer: 200 },
    "alarms/[id]": { url: `/api/alarms/${f.alarmId}`, viewer: 200 },
    assets: { url: `/api/assets`, viewer: 200 },
    "assets/[id]": { url: `/api/assets/${f.tank.id}`, viewer: 200 },
    "assets/[id]/dips": { url: `/api/assets/${f.tank.id}/dips`, viewer: 200 },
    "assets/[id]/overview": { url: `/api/assets/${f.tank.id}/overview`, viewer: 200 },
    "assets/[id]/series": { url: `/api/assets/${f.tank.id}/series?bucket=5m`, viewer: 200 },
    "assets/[id]/setpoints": { url: `/api/assets/${f.tank.id}/setpoints`, viewer: 200 },
    "assets/[id]/uncertainty": { url: `/api/assets/${f.tank.id}/uncertainty`, viewer: 200 },
    audit: { url: `/api/audit`, viewer: 403 },
    "auth/[...nextauth]": "public",
    "channels/[id]/calibration": { url: `/api/channels/${channel}/calibration`, viewer: 200 },
    "channels/[id]/health": { url: `/api/channels/${channel}/health`, viewer: 200 },
    "channels/[id]/measurements": { url: `/api/channels/${channel}/measurements`, viewer: 200 },
    "device-health": { url: `/api/device-health?page_size=200`, viewer: 200 },
    devices: { url: `/api/devices`, viewer: 200 },
    "devices/[id]": { url: `/api/devices/${f.device.id}`, viewer: 200 },
    "exports/alarms": { url: `/api/exports/alarms?${range()}`, viewer: 200 },
    "exports/measurements": { url: `/api/exports/measurements?asset_ids=${f.tank.id}&${range()}`, viewer: 200 },
    "exports/refill-plan": { url: `/api/exports/refill-plan?horizon_days=30`, viewer: 200 },
    health: "public",
    imports: { url: `/api/imports`, viewer: 403 },
    "imports/[id]": { url: `/api/imports/${f.site.id}`, viewer: 403 },
    "me/display-settings": { url: `/api/me/display-settings`, viewer: 200 },
    mail: { url: `/api/mail`, viewer: 403 },
    "mail/[id]": { url: `/api/mail/1`, viewer: 403 },
    overview: { url: `/api/overview`, viewer: 200 },
    "organisation/display-settings": { url: `/api/organisation/display-settings`, viewer: 200 },
    "refill-plan": { url: `/api/refill-plan?horizon_days=30`, viewer: 200 },
    sites: { url: `/api/sites`, viewer: 200 },
    "sites/[id]": { url: `/api/sites/${f.site.id}`, viewer: 200 },
    "sites/[id]/on-call": { url: `/api/sites/${f.site.id}/on-call`, viewer: 200 },
    "sites/[id]/overview": { url: `/api/sites/${f.site.id}/overview`, viewer: 200 },
    users: { url: `/api/users`, viewer: 403 },
    "v1/openapi.json": "public",
    "v1/time": "public",
  };
}

const idsOf = (f: Fleet & { alarmId: string }) => [f.site.id, f.tank.id, f.device.id, f.device.channels[0].id as string, f.alarmId, f.site.name, f.tank.name, f.device.serial];

describe("partner scope", () => {
  it("walks every GET route handler as a viewer limited to one site: the other site never shows, its ids answer 404", async () => {
    const routes = getRoutes();
    const mine = routeCalls(assigned);
    const theirs = routeCalls(unassigned);
    expect(routes.filter((r) => !(r in mine))).toEqual([]);
    const hidden = idsOf(unassigned);
    for (const r of routes) {
      const call = mine[r];
      if (call === "public") continue;
      const res = await partner.get(call.url);
      expect(res.status, `${r} for the assigned site`).toBe(call.viewer);
      const body = res.text ?? JSON.stringify(res.body);
      for (const secret of hidden) expect(body.includes(secret), `${r} shows ${secret} of an unassigned site`).toBe(false);
      const other = theirs[r];
      if (other !== "public" && other.url !== call.url) {
        const direct = await partner.get(other.url);
        expect(direct.status, `${r} for an unassigned site's id`).toBe(call.viewer === 200 ? 404 : 403);
      }
    }
    // The unassigned site filtered by hand is empty, not an error that tells it exists.
    const filtered = await partner.get(`/api/alarms?site_id=${unassigned.site.id}`).expect(200);
    expect(filtered.body.total).toBe(0);
  }, 240_000);

  it("leaves a viewer without assigned sites reading every site, and staff unaffected", async () => {
    const viewer = await signedIn("viewer@halftrip.test");
    for (const agent of [viewer, operator]) {
      const sites = (await agent.get("/api/sites").expect(200)).body.items.map((s: { id: string }) => s.id);
      expect(sites).toEqual(expect.arrayContaining([assigned.site.id, unassigned.site.id]));
      await agent.get(`/api/alarms/${unassigned.alarmId}`).expect(200);
    }
  });

  it("is set by an admin only, for a viewer only, to sites of the organisation, with an audit row", async () => {
    const [audit] = await sql<{ details: { after: { site_ids: string[] } } }>(
      `SELECT details FROM audit_log WHERE action = 'user.update' AND entity_id = $1 ORDER BY id DESC LIMIT 1`,
      [partnerId],
    );
    expect(audit.details.after.site_ids).toEqual([assigned.site.id]);
    expect((await operator.patch(`/api/users/${partnerId}`).send({ site_ids: [] })).status).toBe(403);
    const [op] = await sql<{ id: string }>(`SELECT id FROM users WHERE email = 'operator@halftrip.test'`);
    const forOperator = await admin.patch(`/api/users/${op.id}`).send({ site_ids: [assigned.site.id] });
    expect(forOperator.status).toBe(422);
    expect(forOperator.body.fields.site_ids).toMatch(/viewer/);
    const other = await createOtherOrganisation();
    const { agent: otherAdmin } = await signInAgent(other.adminEmail, other.password);
    const theirSite = (await otherAdmin.post("/api/sites").send({ name: "Their depot", time_zone: "UTC" }).expect(201)).body.id;
    const foreign = await admin.patch(`/api/users/${partnerId}`).send({ site_ids: [assigned.site.id, theirSite] });
    expect(foreign.status).toBe(422);
    expect(foreign.body.fields["site_ids.1"]).toMatch(/No such site/);
    expect((await admin.patch(`/api/users/${partnerId}`).send({ site_ids: ["not-a-uuid"] })).status).toBe(422);
  });
});

describe("staff e-mail addresses", () => {
  it("are shown to staff and never to a viewer: on-call lists, alarm events, acknowledged-by, notifications, exports", async () => {
    const staffAlarm = (await operator.get(`/api/alarms/${assigned.alarmId}`).expect(200)).body;
    expect(staffAlarm.acknowledged_by.email).toBe(TECHNICIAN);
    expect(JSON.stringify((await operator.get(`/api/sites/${assigned.site.id}/on-call`).expect(200)).body)).toContain(TECHNICIAN);

    for (const agent of [partner, await signedIn("viewer@halftrip.test")]) {
      const alarm = (await agent.get(`/api/alarms/${assigned.alarmId}`).expect(200)).body;
      expect(alarm.acknowledged_by.name).toBeTruthy();
      expect(alarm.events.some((e: { kind: string }) => e.kind === "acknowledged")).toBe(true);
      const onCall = (await agent.get(`/api/sites/${assigned.site.id}/on-call`).expect(200)).body;
      expect(onCall.entries.map((e: { name: string }) => e.name)).toHaveLength(1);
      for (const url of [
        `/api/alarms/${assigned.alarmId}`,
        `/api/alarms?state=active&page_size=200`,
        `/api/sites/${assigned.site.id}/on-call`,
        `/api/assets/${assigned.tank.id}/overview`,
        `/api/assets/${assigned.tank.id}/dips`,
        `/api/channels/${assigned.device.channels[0].id}/calibration`,
        `/api/exports/alarms?${range()}`,
      ]) {
        const res = await agent.get(url).expect(200);
        const body = res.text ?? JSON.stringify(res.body);
        expect(body, url).not.toMatch(/@halftrip\.test/);
      }
    }
  }, 120_000);
});

describe("inviting an address another organisation uses", () => {
  it("answers exactly as for a new address, and only the invitee learns the address is taken", async () => {
    const other = await createOtherOrganisation();
    const fresh = `fresh-${Date.now()}@example.org`;
    const taken = await admin.post("/api/users").send({ email: other.adminEmail, name: "Probe", role: "viewer" });
    const free = await admin.post("/api/users").send({ email: fresh, name: "Probe", role: "viewer" });
    expect(taken.status).toBe(free.status);
    expect(taken.status).toBe(201);
    expect(Object.keys(taken.body.user).sort()).toEqual(Object.keys(free.body.user).sort());
    expect(taken.body.user).toMatchObject({ email: other.adminEmail, status: "invited", role: "viewer" });
    // The same invite mail goes out either way; accepting it is where the address owner hears it is taken.
    const mail = await waitForMail(other.adminEmail);
    const token = decodeURIComponent(new URL(firstLink(mail.text, "/invite/")).pathname.split("/invite/")[1]);
    const accepted = await anonymous().post("/api/invites/accept").send({ token, password: "a-long-password-1", confirm: "a-long-password-1" });
    expect(accepted.status).toBe(410);
    expect(accepted.body.error).toBe("invite_address_taken");
    // The other organisation's account is untouched and still signs in with its own password.
    expect((await signInAgent(other.adminEmail, other.password)).status).toBe(200);
    expect((await signInAgent(other.adminEmail, "a-long-password-1")).status).toBe(401);
    const [owner] = await sql<{ organisation_id: string; status: string }>(`SELECT organisation_id, status FROM users WHERE lower(email) = lower($1) AND status <> 'invited'`, [other.adminEmail]);
    expect(owner).toEqual({ organisation_id: other.organisationId, status: "active" });
    // Inviting an address this organisation already has is still refused: the admin sees its own users anyway.
    expect((await admin.post("/api/users").send({ email: fresh, role: "viewer" })).status).toBe(409);
  });
});
