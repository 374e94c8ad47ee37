import { expect, test } from "@playwright/test";
import { signInAs } from "../support/browser";
import { anonymous, signedIn, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { sql } from "../support/db";
import { firstLink, waitForMail } from "../support/mail-sink";
import { runWorkerOnce } from "../support/worker";

// Issue 5 end to end in the browser: readings push a tank over H, the worker raises the alarm and
// e-mails the technician, the technician opens the link (not signed in) and confirms, the alarm is
// acknowledged as theirs, and readings below H − deadband bring it back to normal. Then the alarms
// page: bulk acknowledge with a comment and shelve with a reason, as an operator.

// Speed of sound in dry air at 20 °C (REFERENCES.md §1); the readings carry air_temp_c 20.
const C_20 = 343.215;
const MOUNT_M = 3;

async function provision(setpoints: Record<string, unknown>) {
  const admin = await signedIn("admin@halftrip.test");
  const operator = await signedIn("operator@halftrip.test");
  const fleet = await createTankWithDevice(admin, { device: { expected_interval_s: 3600 } });
  await operator.put(`/api/assets/${fleet.tank.id}/setpoints`).send({ setpoints }).expect(200);
  const ids = await sql<{ id: string; email: string }>(`SELECT id, email FROM users WHERE email IN ('technician@halftrip.test', 'operator@halftrip.test')`);
  const order = ["technician@halftrip.test", "operator@halftrip.test"].map((e) => ids.find((u) => u.email === e)!.id);
  await operator.put(`/api/sites/${fleet.site.id}/on-call`).send({ user_ids: order }).expect(200);
  let clock = 0;
  let seq = 1;
  const send = async (levels: number[]) => {
    clock = Math.max(clock, Date.now() - levels.length * 10_000);
    const readings = levels.map((level) => {
      clock += 10_000;
      // Round-trip echo time t = 2·d / c (REFERENCES.md §2), d = mount height − level.
      return { seq: seq++, at: new Date(clock).toISOString(), channel: 0, echo_us: Math.round(((2 * (MOUNT_M - level)) / C_20) * 1e7) / 10, air_temp_c: 20 };
    });
    const res = await anonymous().post("/api/v1/readings").set("Authorization", `Bearer ${fleet.apiKey}`).send({ readings });
    expect(res.status).toBe(202);
    expect(res.body.rejected).toEqual([]);
  };
  return { ...fleet, operator, send };
}

async function alarmOf(agent: Agent, tankId: string, kind: string) {
  const list = await agent.get(`/api/alarms?asset_id=${tankId}&kind=${kind}&state=normal,active`).expect(200);
  return (await agent.get(`/api/alarms/${list.body.items[0].id}`).expect(200)).body;
}


const repeat = (level: number, n: number) => Array.from({ length: n }, () => level);

test("the technician acknowledges an H alarm from the e-mail link, and the alarm returns to normal", async ({ page }) => {
  test.setTimeout(180_000);
  const t = await provision({ h: { value: 2.0, deadband_m: 0.14, on_delay_s: 30, priority: "medium" } });
  await t.send([...repeat(1.5, 6), ...repeat(2.2, 12)]);
  await runWorkerOnce();
  expect((await alarmOf(t.operator, t.tank.id, "h")).state).toBe("unacknowledged");

  const mail = await waitForMail("technician@halftrip.test", (m) => m.subject.includes(t.tank.name));
  const link = firstLink(mail.text, "/ack/");
  await page.goto(link);
  await expect(page.getByRole("heading", { name: "Acknowledge this alarm?" })).toBeVisible();
  await expect(page.getByText("recorded as Tess Technician (technician@halftrip.test)")).toBeVisible();
  await expect(page.getByText(t.tank.name)).toBeVisible();
  await expect(page.getByRole("note")).toContainText("not an overfill-prevention or safety system");
  // Opening the page acknowledged nothing.
  expect((await alarmOf(t.operator, t.tank.id, "h")).state).toBe("unacknowledged");

  await page.getByLabel("Comment (optional)").fill("checking the inlet valve");
  await page.getByRole("button", { name: "Acknowledge" }).click();
  await expect(page.getByRole("status")).toContainText("Acknowledged as technician@halftrip.test");
  // The page no longer asks: its heading and the state row say what happened.
  await expect(page.getByRole("heading", { name: "Alarm acknowledged" })).toBeVisible();
  await expect(page.getByRole("heading", { name: "Acknowledge this alarm?" })).toHaveCount(0);
  await expect(page.locator("dd [data-state]")).toHaveText("Acknowledged");
  const acked = await alarmOf(t.operator, t.tank.id, "h");
  expect(acked.state).toBe("acknowledged");
  expect(acked.acknowledged_by.email).toBe("technician@halftrip.test");
  expect(acked.events.find((e: { kind: string }) => e.kind === "acknowledged")).toMatchObject({
    actor_label: "technician@halftrip.test",
    comment: "checking the inlet valve",
    from_state: "unacknowledged",
    to_state: "acknowledged",
  });

  // The link works once.
  await page.goto(link);
  await expect(page.getByRole("heading", { name: "This link cannot be used" })).toBeVisible();
  await expect(page.getByText("This acknowledge link was already used")).toBeVisible();

  await t.send(repeat(1.8, 12));
  await runWorkerOnce();
  const normal = await alarmOf(t.operator, t.tank.id, "h");
  expect(normal.state).toBe("normal");
  expect(normal.events.some((e: { kind: string; to_state: string }) => e.kind === "returned_to_normal" && e.to_state === "normal")).toBe(true);
});

test("an operator acknowledges two alarms at once with a comment and shelves one with a reason", async ({ page }) => {
  test.setTimeout(180_000);
  const t = await provision({ hh: { value: 2.5, on_delay_s: 30, priority: "high" }, h: { value: 2.0, on_delay_s: 30, priority: "medium" } });
  await t.send([...repeat(1.5, 6), ...repeat(2.7, 12)]);
  await runWorkerOnce();

  await signInAs(page, "operator@halftrip.test");
  await page.goto(`/alarms?site_id=${t.site.id}`);
  await expect(page.getByRole("note")).toContainText("API 2350 / IEC 61511");
  const rows = page.locator("tbody tr");
  await expect(rows).toHaveCount(2);
  await expect(rows.first()).toContainText("▲");
  await expect(rows.first()).toContainText("High");
  await expect(rows.first()).toContainText("Unacknowledged");

  await page.getByLabel("Select every alarm on this page that can be acknowledged").check();
  await page.getByRole("button", { name: "Acknowledge selected" }).click();
  const dialog = page.getByRole("dialog");
  await dialog.getByLabel("Comment (optional)").fill("crew on site");
  await dialog.getByRole("button", { name: "Acknowledge" }).click();
  await expect(dialog).toHaveCount(0);
  await expect(rows.filter({ hasText: "Unacknowledged" })).toHaveCount(0);
  await expect(rows.filter({ hasText: "Acknowledged" })).toHaveCount(2);
  const hh = await alarmOf(t.operator, t.tank.id, "hh");
  expect(hh.events.find((e: { kind: string }) => e.kind === "acknowledged")).toMatchObject({ actor_label: "operator@halftrip.test", comment: "crew on site" });

  await rows.filter({ hasText: "H level ·" }).filter({ hasNotText: "HH level" }).getByRole("button", { name: /^Shelve/ }).click();
  await dialog.getByRole("button", { name: "Shelve" }).click();
  await expect(dialog.getByText("Give a reason for shelving.")).toBeVisible();
  await dialog.getByLabel("Reason").fill("pump test this morning");
  await dialog.getByLabel("For").selectOption({ label: "1 h" });
  const asked = Date.now();
  await dialog.getByRole("button", { name: "Shelve" }).click();
  await expect(dialog).toHaveCount(0);
  await expect(rows.filter({ hasText: "Shelved" })).toHaveCount(1);
  const h = await alarmOf(t.operator, t.tank.id, "h");
  expect(h).toMatchObject({ state: "shelved", shelve_reason: "pump test this morning" });
  // One hour from some instant between the click and now (1 s either side for the stored precision).
  expect(Date.parse(h.shelved_until)).toBeGreaterThanOrEqual(asked + 3_600_000 - 1000);
  expect(Date.parse(h.shelved_until)).toBeLessThanOrEqual(Date.now() + 3_600_000 + 1000);
});

test("a viewer sees the alarms but no acknowledge or shelve buttons", async ({ page }) => {
  await signInAs(page, "viewer@halftrip.test");
  await page.goto("/alarms?state=all");
  await expect(page.getByRole("heading", { name: "Alarms" })).toBeVisible();
  await expect(page.locator("tbody tr").first()).toBeVisible();
  await expect(page.getByRole("button", { name: /^Acknowledge/ })).toHaveCount(0);
  await expect(page.getByRole("button", { name: /^Shelve/ })).toHaveCount(0);
});
