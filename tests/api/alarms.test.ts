import { randomUUID } from "node:crypto";
import { beforeAll, describe, expect, it } from "vitest";
import { anonymous, signedIn, type Agent } from "../support/session";
import { repeat, tankWithAlarms as tankWithTestAlarms, tokenOf } from "../support/alarm-tank";
import { createTankWithDevice } from "../support/fleet";
import { createOtherOrganisation, sql } from "../support/db";
import { waitForMail } from "../support/mail-sink";
import { runWorkerOnce } from "../support/worker";
import { createSignedToken } from "@/lib/auth/invite-token";

// Alarms end to end through the API and the worker (issue 5): setpoints and on-call lists, readings
// pushing a tank over H, the worker raising the alarm and e-mailing the on-call list, the signed
// acknowledge link, escalation, the people's actions with their roles, and alarm health.

let admin: Agent;
let operator: Agent;
let technician: Agent;
let viewer: Agent;
let technicianId: string;
let operatorId: string;

beforeAll(async () => {
  [admin, operator, technician, viewer] = await Promise.all(
    ["admin", "operator", "technician", "viewer"].map((r) => signedIn(`${r}@halftrip.test`)),
  );
  const users = await sql<{ id: string; email: string }>(`SELECT id, email FROM users WHERE email IN ('technician@halftrip.test', 'operator@halftrip.test')`);
  technicianId = users.find((u) => u.email.startsWith("technician"))!.id;
  operatorId = users.find((u) => u.email.startsWith("operator"))!.id;
});

/** A tank with setpoints and an on-call list (technician, then operator), and a way to send it levels. */
const tankWithAlarms = (setpoints?: Record<string, unknown>) => tankWithTestAlarms(admin, operator, [technicianId, operatorId], setpoints);

async function alarmOf(tankId: string, kind: string) {
  const res = await operator.get(`/api/alarms?asset_id=${tankId}&kind=${kind}&state=normal,active`).expect(200);
  expect(res.body.items).toHaveLength(1);
  return (await operator.get(`/api/alarms/${res.body.items[0].id}`).expect(200)).body;
}


describe("an H alarm from readings to acknowledgement by e-mail and back to normal", () => {
  it("activates, e-mails the first on-call person a single-use link, records the acknowledgement as theirs, and clears below H − deadband", async () => {
    const t = await tankWithAlarms();
    await t.send([...repeat(1.5, 6), ...repeat(2.2, 12)]);
    await runWorkerOnce();

    const raised = await alarmOf(t.tank.id, "h");
    expect(raised).toMatchObject({ state: "unacknowledged", priority: "medium", condition_active: true, setpoint: 2.0, unit: "m" });
    expect(raised.value).toBeCloseTo(2.2, 3);
    const activated = raised.events.find((e: { kind: string }) => e.kind === "activated");
    expect(activated).toMatchObject({ from_state: "normal", to_state: "unacknowledged", setpoint: 2.0, actor_label: "worker" });
    expect(activated.cause).toMatch(/≥ H 2\.000 m for 30 s/);

    const mail = await waitForMail("technician@halftrip.test", (m) => m.subject.includes(t.tank.name));
    expect(mail.subject).toMatch(/^Active — ■ Medium alarm: H level at /);
    expect(mail.text).toContain(t.site.name);
    expect(mail.text).toContain("State: ACTIVE now, not acknowledged");
    // The value that activated it and the latest, each with its time labelled with the site's zone.
    expect(mail.text).toMatch(/At activation: 2\.2\d*\u00a0m( ±\u00a0[\d.]+\u00a0mm)? at \d{1,2} \w{3} \d{4}, \d\d:\d\d (GMT|IST)/);
    expect(mail.text).toMatch(/Latest: 2\.2\d*\u00a0m( ±\u00a0[\d.]+\u00a0mm)? at \d{1,2} \w{3} \d{4}, \d\d:\d\d (GMT|IST)/);
    expect(mail.text).toContain("Setpoint: 2.000\u00a0m");
    // No digit the uncertainty does not support: the latest level's standard uncertainty, rounded by the
    // Particle Data Group's rule (Review of Particle Physics, Introduction: three leading digits 100–354 keep two
    // significant digits, 355–949 one, 950–999 go up to 1000 with two), and the level to the same decimal place.
    const [latest] = await sql<{ level_m: number; uncertainty_m: number }>(
      `SELECT level_m, uncertainty_m FROM measurements WHERE asset_id = $1 AND level_m IS NOT NULL ORDER BY at DESC LIMIT 1`,
      [t.tank.id],
    );
    const uMm = latest.uncertainty_m * 1000;
    const exponent = Math.floor(Math.log10(uMm));
    const leading = Math.round(uMm / 10 ** (exponent - 2));
    const mmDecimals = leading >= 950 ? -exponent : (leading <= 354 ? 2 : 1) - 1 - exponent;
    const uText = (leading >= 950 ? 10 ** (exponent + 1) : uMm).toFixed(Math.max(0, mmDecimals));
    const levelText = latest.level_m.toFixed(Math.max(0, mmDecimals + 3));
    expect(mail.text).toContain(`Latest: ${levelText}\u00a0m ±\u00a0${uText}\u00a0mm at `);
    expect(mail.html).toContain(`${levelText}\u00a0m ±\u00a0${uText}\u00a0mm at `);
    expect(mail.text).toContain("not an overfill-prevention or safety system");
    const token = tokenOf(mail.text);
    expect(raised.events.some((e: { kind: string; cause: string }) => e.kind === "notified" && e.cause.includes("technician@halftrip.test"))).toBe(true);

    // Opening the link changes nothing; only the POST behind the page's button acknowledges.
    const page = await technician.get(`/ack/${encodeURIComponent(token)}`).expect(200);
    expect(page.text).toContain("Acknowledge this alarm?");
    expect((await alarmOf(t.tank.id, "h")).state).toBe("unacknowledged");

    const ack = await anonymous().post("/api/alarms/ack-link").send({ token, comment: "on my way" }).expect(200);
    expect(ack.body).toMatchObject({ ok: true, acknowledged_by: "technician@halftrip.test" });
    const acked = await alarmOf(t.tank.id, "h");
    expect(acked.state).toBe("acknowledged");
    expect(acked.acknowledged_by.email).toBe("technician@halftrip.test");
    expect(acked.events.find((e: { kind: string }) => e.kind === "acknowledged")).toMatchObject({ actor_label: "technician@halftrip.test", comment: "on my way", to_state: "acknowledged" });
    const audit = await sql(`SELECT actor_label, details FROM audit_log WHERE action = 'alarm.acknowledge' AND entity_id = $1`, [acked.id]);
    expect(audit).toEqual([expect.objectContaining({ actor_label: "technician@halftrip.test" })]);

    const again = await anonymous().post("/api/alarms/ack-link").send({ token }).expect(410);
    expect(again.body.error).toBe("ack_link_used");

    // 1.90 m is inside the deadband (above 2.0 − 0.14 = 1.86 m): still active; 1.80 m clears it.
    await t.send(repeat(1.9, 12));
    await runWorkerOnce();
    expect((await alarmOf(t.tank.id, "h")).state).toBe("acknowledged");
    await t.send(repeat(1.8, 12));
    await runWorkerOnce();
    const cleared = await alarmOf(t.tank.id, "h");
    expect(cleared.state).toBe("normal");
    const clearing = cleared.events.find((e: { kind: string }) => e.kind === "returned_to_normal");
    expect(clearing).toMatchObject({ from_state: "acknowledged", to_state: "normal" });
    expect(clearing.value).toBeLessThan(1.86);

    // Running the worker again over nothing new changes nothing.
    await runWorkerOnce();
    expect((await alarmOf(t.tank.id, "h")).events).toHaveLength(cleared.events.length);
  }, 120_000);
});

describe("escalation and bursts", () => {
  it("e-mails the second person once the site's escalation delay passes without an acknowledgement", async () => {
    const t = await tankWithAlarms();
    await admin.patch(`/api/sites/${t.site.id}`).send({ escalation_delay_min: 1 }).expect(200);
    await t.send([...repeat(1.5, 6), ...repeat(2.2, 12)]);
    await runWorkerOnce();
    await waitForMail("technician@halftrip.test", (m) => m.subject.includes(t.tank.name));
    const alarm = await alarmOf(t.tank.id, "h");

    // Not yet a minute: nobody else is told.
    await runWorkerOnce();
    let notices = await sql(`SELECT email, reason FROM alarm_notifications WHERE alarm_id = $1 ORDER BY position`, [alarm.id]);
    expect(notices).toEqual([{ email: "technician@halftrip.test", reason: "activation" }]);

    // The first e-mail went out two minutes ago (the delay is 1 min): the next run escalates.
    await sql(`UPDATE alarm_notifications SET sent_at = sent_at - interval '2 minutes' WHERE alarm_id = $1`, [alarm.id]);
    await runWorkerOnce();
    const escalated = await waitForMail("operator@halftrip.test", (m) => m.subject.includes(t.tank.name));
    expect(escalated.text).toContain("escalated to you");
    notices = await sql(`SELECT email, reason, position FROM alarm_notifications WHERE alarm_id = $1 ORDER BY position`, [alarm.id]);
    expect(notices).toEqual([
      { email: "technician@halftrip.test", reason: "activation", position: 1 },
      { email: "operator@halftrip.test", reason: "escalation", position: 2 },
    ]);
    // The end of the list: nothing more, however long it waits.
    await sql(`UPDATE alarm_notifications SET sent_at = sent_at - interval '10 minutes' WHERE alarm_id = $1`, [alarm.id]);
    await runWorkerOnce();
    expect(await sql(`SELECT 1 FROM alarm_notifications WHERE alarm_id = $1`, [alarm.id])).toHaveLength(2);
  }, 120_000);

  it("sends a burst at one site as one summary e-mail, and bulk acknowledge takes both alarms", async () => {
    const t = await tankWithAlarms();
    await t.send([...repeat(1.5, 6), ...repeat(2.7, 12)]);
    await runWorkerOnce();
    const mail = await waitForMail("technician@halftrip.test", (m) => m.subject === `2 alarms at ${t.site.name} (2 active, 0 cleared)`);
    expect(mail.text.match(/Acknowledge: /g)).toHaveLength(2);
    const [h, hh] = [await alarmOf(t.tank.id, "h"), await alarmOf(t.tank.id, "hh")];
    expect([h.state, hh.state]).toEqual(["unacknowledged", "unacknowledged"]);
    const lll = await alarmOf(t.tank.id, "ll");
    const bulk = await technician.post("/api/alarms/acknowledge").send({ ids: [h.id, hh.id, lll.id], comment: "both seen" }).expect(200);
    expect(bulk.body.acknowledged.map((a: { id: string }) => a.id).sort()).toEqual([h.id, hh.id].sort());
    expect(bulk.body.refused).toEqual([{ id: lll.id, error: "not_acknowledgeable", message: expect.stringMatching(/normal/) }]);
  }, 120_000);
});

describe("acknowledge links that must not work", () => {
  let token: string;
  let alarmId: string;
  beforeAll(async () => {
    const t = await tankWithAlarms();
    await t.send([...repeat(1.5, 6), ...repeat(2.2, 12)]);
    await runWorkerOnce();
    token = tokenOf((await waitForMail("technician@halftrip.test", (m) => m.subject.includes(t.tank.name))).text);
    alarmId = (await alarmOf(t.tank.id, "h")).id;
  }, 120_000);

  const stillUnacknowledged = async () => expect((await operator.get(`/api/alarms/${alarmId}`).expect(200)).body.state).toBe("unacknowledged");

  it("refuses a tampered, an unknown and an expired link, changing nothing", async () => {
    const [id, exp, sig] = token.split(".");
    const tampered = `${id}.${exp}.${sig.slice(0, -2)}${sig.endsWith("AA") ? "BB" : "AA"}`;
    expect((await anonymous().post("/api/alarms/ack-link").send({ token: tampered }).expect(404)).body.error).toBe("ack_link_bad_signature");
    // Signed with the server's secret, but naming no notification.
    const unknown = createSignedToken(randomUUID(), new Date(Date.now() + 3_600_000), "alarm-ack");
    expect((await anonymous().post("/api/alarms/ack-link").send({ token: unknown }).expect(404)).body.error).toBe("ack_link_unknown");
    // The real notification, with an expiry in the past.
    const expired = createSignedToken(id, new Date(Date.now() - 60_000), "alarm-ack");
    expect((await anonymous().post("/api/alarms/ack-link").send({ token: expired }).expect(410)).body.error).toBe("ack_link_expired");
    // The link as sent, after its row expired.
    await sql(`UPDATE alarm_notifications SET expires_at = now() - interval '1 minute' WHERE id = $1`, [id]);
    expect((await anonymous().post("/api/alarms/ack-link").send({ token }).expect(410)).body.error).toBe("ack_link_expired");
    const page = await technician.get(`/ack/${encodeURIComponent(token)}`).expect(200);
    expect(page.text).toContain("This link cannot be used");
    expect(page.text).toContain("expired");
    await sql(`UPDATE alarm_notifications SET expires_at = now() + interval '1 hour' WHERE id = $1`, [id]);
    await stillUnacknowledged();
    // Only the refusal of the real link, whose row it names, spends it: refused once, refused for good,
    // even now that its row would no longer be expired.
    expect(await sql(`SELECT refusal FROM alarm_notifications WHERE id = $1 AND used_at IS NOT NULL`, [id])).toEqual([{ refusal: "expired" }]);
    expect((await anonymous().post("/api/alarms/ack-link").send({ token }).expect(410)).body.error).toBe("ack_link_expired");
    await stillUnacknowledged();
  });

  it("refuses someone signed in to another organisation", async () => {
    // The link as it was before the case above spent it.
    await sql(`UPDATE alarm_notifications SET used_at = NULL, refusal = NULL WHERE id = $1`, [token.split(".")[0]]);
    const other = await createOtherOrganisation();
    const outsider = await signedIn(other.adminEmail, other.password);
    const res = await outsider.post("/api/alarms/ack-link").send({ token }).expect(403);
    expect(res.body.error).toBe("ack_link_other_organisation");
    expect((await outsider.get(`/api/alarms/${alarmId}`)).status).toBe(404);
    expect((await outsider.get(`/api/alarms`).expect(200)).body.items.map((a: { id: string }) => a.id)).not.toContain(alarmId);
    await stillUnacknowledged();
  });

  it("refuses a viewer who tries to acknowledge (403)", async () => {
    expect((await viewer.post(`/api/alarms/${alarmId}/acknowledge`).send({}).expect(403)).body.error).toBe("forbidden");
    expect((await viewer.post(`/api/alarms/acknowledge`).send({ ids: [alarmId] }).expect(403)).body.error).toBe("forbidden");
    await stillUnacknowledged();
  });
});

describe("shelve, out of service, return to service and reset", () => {
  it("shelves with a reason for at most 24 h, returns by itself when due, and checks each role", async () => {
    const t = await tankWithAlarms();
    await t.send([...repeat(1.5, 6), ...repeat(2.2, 12)]);
    await runWorkerOnce();
    const { id } = await alarmOf(t.tank.id, "h");
    expect((await technician.post(`/api/alarms/${id}/shelve`).send({ reason: "x", duration_min: 30 }).expect(403)).body.error).toBe("forbidden");
    const noReason = await operator.post(`/api/alarms/${id}/shelve`).send({ duration_min: 30 }).expect(422);
    expect(noReason.body.fields.reason).toMatch(/reason/);
    const tooLong = await operator.post(`/api/alarms/${id}/shelve`).send({ reason: "tank cleaning", until: new Date(Date.now() + 25 * 3_600_000).toISOString() }).expect(422);
    expect(tooLong.body.fields.until).toMatch(/at most 24 h/);
    const asked = Date.now();
    const shelved = await operator.post(`/api/alarms/${id}/shelve`).send({ reason: "tank cleaning", duration_min: 60 }).expect(200);
    const answered = Date.now();
    expect(shelved.body).toMatchObject({ state: "shelved", shelve_reason: "tank cleaning" });
    // 60 min from some instant while the request was served (1 s either side for the stored precision).
    expect(Date.parse(shelved.body.shelved_until)).toBeGreaterThanOrEqual(asked + 60 * 60_000 - 1000);
    expect(Date.parse(shelved.body.shelved_until)).toBeLessThanOrEqual(answered + 60 * 60_000 + 1000);
    const audit = await sql(`SELECT details FROM audit_log WHERE action = 'alarm.shelve' AND entity_id = $1`, [id]);
    expect(audit[0].details).toMatchObject({ reason: "tank cleaning", from: "unacknowledged", to: "shelved" });

    // The expiry passes; the worker unshelves it, and with the level still high it is unacknowledged again.
    await sql(`UPDATE alarms SET shelved_until = now() - interval '1 second' WHERE id = $1`, [id]);
    await runWorkerOnce();
    const back = await alarmOf(t.tank.id, "h");
    expect(back.state).toBe("unacknowledged");
    expect(back.events.find((e: { kind: string }) => e.kind === "shelve_expired")).toMatchObject({ from_state: "shelved", to_state: "unacknowledged" });

    expect((await operator.post(`/api/alarms/${id}/out-of-service`).send({ reason: "sensor replaced" }).expect(403)).body.error).toBe("forbidden");
    expect((await admin.post(`/api/alarms/${id}/out-of-service`).send({}).expect(422)).body.fields.reason).toBeDefined();
    expect((await admin.post(`/api/alarms/${id}/out-of-service`).send({ reason: "sensor replaced" }).expect(200)).body).toMatchObject({ state: "out_of_service", out_of_service_reason: "sensor replaced" });
    expect((await technician.post(`/api/alarms/${id}/acknowledge`).expect(409)).body.error).toBe("not_acknowledgeable");
    expect((await admin.post(`/api/alarms/${id}/return-to-service`).expect(200)).body.state).toBe("unacknowledged");
    expect((await admin.post(`/api/alarms/${id}/return-to-service`).expect(409)).body.error).toBe("not_out_of_service");
  }, 120_000);

  it("keeps a latching alarm acknowledged after it clears until someone resets it", async () => {
    const t = await tankWithAlarms({ h: { value: 2.0, deadband_m: 0.14, on_delay_s: 0, latching: true } });
    await t.send([...repeat(1.5, 6), ...repeat(2.2, 8)]);
    await runWorkerOnce();
    const { id } = await alarmOf(t.tank.id, "h");
    expect((await operator.post(`/api/alarms/${id}/reset`).expect(409)).body.message).toMatch(/still active/);
    await technician.post(`/api/alarms/${id}/acknowledge`).send({ comment: "seen" }).expect(200);
    await t.send(repeat(1.5, 12));
    await runWorkerOnce();
    const latched = await alarmOf(t.tank.id, "h");
    expect(latched).toMatchObject({ state: "acknowledged", condition_active: false, awaiting_reset: true });
    expect((await technician.post(`/api/alarms/${id}/reset`).expect(403)).body.error).toBe("forbidden");
    const reset = await operator.post(`/api/alarms/${id}/reset`).expect(200);
    expect(reset.body).toMatchObject({ state: "normal", awaiting_reset: false });
  }, 120_000);
});

describe("setpoints and on-call lists", () => {
  it("checks setpoints against the tank with a message per field, converts fill %, and lets only operators and admins edit", async () => {
    const { tank } = await createTankWithDevice(admin);
    const bad = await operator.put(`/api/assets/${tank.id}/setpoints`).send({ setpoints: { hh: { value: 3.2 }, h: { value: 1.0 }, l: { value: 1.5 } } }).expect(422);
    expect(bad.body.fields["setpoints.hh.value"]).toMatch(/between 0 m and the tank height \(2\.8 m\)/);
    expect(bad.body.fields["setpoints.h.value"]).toMatch(/above L/);
    expect(bad.body.fields["setpoints.l.value"]).toMatch(/below H/);
    expect((await operator.put(`/api/assets/${tank.id}/setpoints`).send({ setpoints: { h: { value: "high" } } }).expect(422)).body.fields["setpoints.h.value"]).toBeDefined();
    expect((await technician.put(`/api/assets/${tank.id}/setpoints`).send({ setpoints: {} }).expect(403)).body.error).toBe("forbidden");
    expect((await viewer.put(`/api/assets/${tank.id}/setpoints`).send({ setpoints: {} }).expect(403)).body.error).toBe("forbidden");

    // The tank is a 2 × 1.5 × 2.8 m box: fill % is level / 2.8 m (volume = l·w·h).
    const ok = await admin.put(`/api/assets/${tank.id}/setpoints`).send({ unit: "pct", setpoints: { h: { value: 75 }, l: { value: 25 } }, rate_of_change: { limit_m_per_h: 0.3 } }).expect(200);
    expect(ok.body.setpoints.h.value_m).toBeCloseTo(2.1, 6);
    expect(ok.body.setpoints.l.value_m).toBeCloseTo(0.7, 6);
    // Defaults: deadband 5 % of the 2.8 m span = 0.14 m, on-delay 60 s (REFERENCES.md §4).
    expect(ok.body.setpoints.h).toMatchObject({ deadband_m: expect.closeTo(0.14, 9), on_delay_s: 60, entered_unit: "pct", entered_value: 75, priority: "medium", enabled: true });
    expect(ok.body.setpoints.hh).toBeNull();
    expect(ok.body.rate_of_change).toEqual({ limit_m_per_h: 0.3, priority: "high", enabled: true });
    expect((await viewer.get(`/api/assets/${tank.id}/setpoints`).expect(200)).body.setpoints.h.value_m).toBeCloseTo(2.1, 6);
    const kinds = (await operator.get(`/api/alarms?asset_id=${tank.id}&state=normal`).expect(200)).body.items.map((a: { kind: string }) => a.kind).sort();
    expect(kinds).toEqual(["h", "l", "rate_of_change"]);
    const audit = await sql(`SELECT actor_label FROM audit_log WHERE action = 'setpoints.update' AND entity_id = $1`, [tank.id]);
    expect(audit).toEqual([{ actor_label: "admin@halftrip.test" }]);
  });

  it("keeps an ordered on-call list of people who may acknowledge", async () => {
    const { site } = await createTankWithDevice(admin);
    const viewerId = (await sql<{ id: string }>(`SELECT id FROM users WHERE email = 'viewer@halftrip.test'`))[0].id;
    const refused = await operator.put(`/api/sites/${site.id}/on-call`).send({ user_ids: [technicianId, viewerId] }).expect(422);
    expect(refused.body.fields["user_ids.1"]).toMatch(/viewer and cannot acknowledge/);
    expect((await operator.put(`/api/sites/${site.id}/on-call`).send({ user_ids: [technicianId, technicianId] }).expect(422)).body.message).toMatch(/once/);
    expect((await technician.put(`/api/sites/${site.id}/on-call`).send({ user_ids: [technicianId] }).expect(403)).body.error).toBe("forbidden");
    const ok = await operator.put(`/api/sites/${site.id}/on-call`).send({ user_ids: [operatorId, technicianId] }).expect(200);
    expect(ok.body.entries.map((e: { email: string; position: number }) => [e.position, e.email])).toEqual([
      [1, "operator@halftrip.test"],
      [2, "technician@halftrip.test"],
    ]);
    const seen = await viewer.get(`/api/sites/${site.id}/on-call`).expect(200);
    expect(seen.body.entries).toHaveLength(2);
    expect(seen.body.candidates).toBeNull();
  });
});

describe("the alarms list and alarm health", () => {
  let t: Awaited<ReturnType<typeof tankWithAlarms>>;
  beforeAll(async () => {
    t = await tankWithAlarms();
    await t.send([...repeat(1.5, 6), ...repeat(2.7, 12)]);
    await runWorkerOnce();
  }, 120_000);

  it("pages, filters and sorts on the server, within the organisation", async () => {
    const site = `site_id=${t.site.id}`;
    const active = await viewer.get(`/api/alarms?${site}&state=active`).expect(200);
    expect(active.body.items.map((a: { kind: string; state: string }) => [a.kind, a.state])).toEqual([
      ["hh", "unacknowledged"],
      ["h", "unacknowledged"],
    ]);
    const all = await viewer.get(`/api/alarms?${site}&state=normal,active&sort=kind&page_size=3`).expect(200);
    expect(all.body).toMatchObject({ total: 4, page: 1, page_size: 3, sort: "kind" });
    expect(all.body.items.map((a: { kind: string }) => a.kind)).toEqual(["h", "hh", "l"]);
    const second = await viewer.get(`/api/alarms?${site}&state=normal,active&sort=kind&page_size=3&page=2`).expect(200);
    expect(second.body.items.map((a: { kind: string }) => a.kind)).toEqual(["ll"]);
    const high = await viewer.get(`/api/alarms?${site}&state=normal,active&priority=high`).expect(200);
    expect(high.body.items.map((a: { kind: string }) => a.kind).sort()).toEqual(["hh", "ll"]);
    const normal = await viewer.get(`/api/alarms?${site}&state=normal&kind=l,ll&sort=-kind`).expect(200);
    expect(normal.body.items.map((a: { kind: string }) => a.kind)).toEqual(["ll", "l"]);
    expect((await viewer.get(`/api/alarms?state=loud`).expect(422)).body.message).toMatch(/state/);
    expect((await viewer.get(`/api/alarms?page_size=500`).expect(422)).body.message).toMatch(/page_size/);
    expect((await anonymous().get(`/api/alarms`).expect(401)).body.error).toBe("unauthorized");
  });

  it("answers 409 with a message for acknowledging an alarm in the normal state", async () => {
    const ll = await alarmOf(t.tank.id, "ll");
    const res = await technician.post(`/api/alarms/${ll.id}/acknowledge`).expect(409);
    expect(res.body).toMatchObject({ error: "not_acknowledgeable", message: expect.stringMatching(/normal; there is nothing to acknowledge/) });
  });

  it("reports each health figure beside its ISA-18.2 / EEMUA benchmark", async () => {
    const res = await viewer.get(`/api/alarm-health?site_id=${t.site.id}`).expect(200);
    expect(res.body.totalActivations).toBe(2);
    expect(res.body.priorityCounts).toEqual({ critical: 0, high: 1, medium: 1, low: 0 });
    expect(res.body.periodDays).toBeCloseTo(30, 6);
    // REFERENCES.md §4: ~6 / ~12 an hour, ~150 / ~300 a day; 2 activations in 30 days.
    expect(res.body.metrics.averagePerHour.benchmark).toMatchObject({ acceptable: 6, manageable: 12 });
    expect(res.body.metrics.averagePerDay.benchmark).toMatchObject({ acceptable: 150, manageable: 300 });
    expect(res.body.metrics.averagePerDay.value).toBeCloseTo(2 / 30, 9);
    expect(res.body.metrics.averagePerDay.verdict).toBe("within");
    expect(res.body.metrics.priorityHighPct.value).toBe(50);
    expect(Object.values(res.body.alarm_labels)).toEqual(expect.arrayContaining([`${t.site.name} › ${t.tank.name} › HH level`]));
    expect((await viewer.get(`/api/alarm-health?from=2026-03-02T00:00:00Z&to=2026-03-01T00:00:00Z`).expect(422)).body.message).toMatch(/before/);
  });
});
