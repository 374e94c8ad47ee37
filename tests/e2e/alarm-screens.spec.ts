import fs from "node:fs";
import { expect, test } from "@playwright/test";
import { signInAs } from "../support/browser";
import { signedIn, type Agent } from "../support/session";
import { runWorkerOnce } from "../support/worker";
import { csvByName } from "../support/csv";
import { provisionTankInAlarm, userIds } from "../support/field-fleet";

// The alarm screens that had no browser test: an alarm's page and its actions, alarm health against the
// benchmarks, the setpoint and on-call editors; and the CSV exports, checked by their header.

let tank: Awaited<ReturnType<typeof provisionTankInAlarm>>;
let operator: Agent;
let alarmId: string;

test.beforeAll(async () => {
  test.setTimeout(180_000);
  const admin = await signedIn("admin@halftrip.test");
  operator = await signedIn("operator@halftrip.test");
  tank = await provisionTankInAlarm(admin);
  await runWorkerOnce();
  const list = await operator.get(`/api/alarms?asset_id=${tank.tank.id}&kind=h&state=normal,active`).expect(200);
  alarmId = list.body.items[0].id;
});

test("an alarm's page: its state now, its events and e-mails; acknowledging it is recorded as the operator", async ({ page }) => {
  await signInAs(page, "operator@halftrip.test");
  await page.goto(`/alarms/${alarmId}`);
  await expect(page.getByRole("heading", { level: 1, name: `H level · ${tank.tank.name}` })).toBeVisible();
  await expect(page.getByRole("note")).toContainText("not an overfill-prevention or safety system");
  const now = page.getByRole("region", { name: "Now" });
  await expect(now).toContainText("Unacknowledged");
  await expect(now).toContainText("Medium");
  const events = page.getByRole("region", { name: "Events" });
  await expect(events.getByRole("row").filter({ hasText: "activated" })).toHaveCount(1);
  const mails = page.getByRole("region", { name: "E-mails" });
  await expect(mails.getByRole("row").filter({ hasText: "technician@halftrip.test" })).toContainText("First notice");

  await page.getByRole("group", { name: "Actions" }).getByRole("button", { name: "Acknowledge" }).click();
  const dialog = page.getByRole("dialog");
  await dialog.getByLabel("Comment (optional)").fill("seen from the alarm page");
  await dialog.getByRole("button", { name: "Acknowledge" }).click();
  await expect(dialog).toHaveCount(0, { timeout: 30_000 });
  await expect(now).toContainText("Acknowledged");
  await expect(now).toContainText("by operator@halftrip.test");
  await expect(events.getByRole("row").filter({ hasText: "seen from the alarm page" })).toContainText("operator@halftrip.test");
  await expect(page.getByRole("group", { name: "Actions" }).getByRole("button", { name: "Acknowledge" })).toHaveCount(0);
  const stored = (await operator.get(`/api/alarms/${alarmId}`).expect(200)).body;
  expect(stored.state).toBe("acknowledged");
});

test("alarm health for one site: each measure beside its benchmark, and the site's alarm among the most frequent", async ({ page }) => {
  await signInAs(page, "operator@halftrip.test");
  await page.goto("/alarm-health");
  await page.getByLabel("Site", { exact: true }).selectOption({ label: tank.site.name });
  await expect(page).toHaveURL(new RegExp(`site_id=${tank.site.id}`));
  const benchmarks = page.getByRole("region", { name: "Against the benchmarks" });
  for (const measure of ["Alarms per 10 min, average", "Alarms per day, average", "Chattering alarms", "Share of the 10 most frequent alarms"]) {
    await expect(benchmarks.getByRole("row").filter({ has: page.getByRole("cell", { name: measure, exact: true }) })).toHaveCount(1);
  }
  // Every verdict is said in words.
  const verdicts = await benchmarks.locator("td[data-label='Verdict']").allTextContents();
  expect(verdicts.length).toBeGreaterThan(0);
  for (const v of verdicts) expect(["Within", "Manageable", "Beyond", "No data"]).toContain(v.trim());
  // One activation at this site in the period: its H alarm is the only one in the top 10.
  const top = page.getByRole("region", { name: "The 10 most frequent alarms" });
  await expect(top.getByRole("row")).toHaveCount(2);
  await expect(top.getByRole("row").nth(1)).toContainText(tank.tank.name);
  await expect(top.locator("td[data-label='Activations']")).toHaveText("1");
  await expect(page.getByRole("region", { name: "Chattering alarms" })).toContainText("None");
});

test("the setpoint editor reads a decimal comma, refuses setpoints out of order, and saves", async ({ page }) => {
  await signInAs(page, "operator@halftrip.test");
  await page.goto(`/alarms/setpoints/${tank.tank.id}`);
  const h = page.getByRole("group", { name: "H setpoint", exact: true });
  await expect(h.getByLabel("H setpoint", { exact: true })).toHaveValue("on");
  await expect(h.getByLabel("H (m)", { exact: true })).toHaveValue("2");

  // L above H is refused, and nothing is stored.
  const l = page.getByRole("group", { name: "L setpoint", exact: true });
  await l.getByLabel("L setpoint", { exact: true }).selectOption("on");
  await l.getByLabel("L (m)", { exact: true }).fill("2,5");
  await page.getByRole("button", { name: "Save setpoints" }).click();
  await expect(page.getByText(/L must be below H/)).toBeVisible({ timeout: 30_000 });
  expect((await operator.get(`/api/assets/${tank.tank.id}/setpoints`).expect(200)).body.setpoints.l).toBeNull();

  // "2,1" is 2.1 m, not 21 m.
  await h.getByLabel("H (m)", { exact: true }).fill("2,1");
  await l.getByLabel("L (m)", { exact: true }).fill("0,6");
  await page.getByRole("button", { name: "Save setpoints" }).click();
  await expect(page.getByRole("status").filter({ hasText: "Setpoints saved." })).toBeVisible({ timeout: 30_000 });
  const saved = (await operator.get(`/api/assets/${tank.tank.id}/setpoints`).expect(200)).body.setpoints;
  expect(saved.h.value_m).toBeCloseTo(2.1, 6);
  expect(saved.l.value_m).toBeCloseTo(0.6, 6);
  expect(saved.l.enabled).toBe(true);

  // A viewer sees the values but cannot change them.
  await page.context().clearCookies();
  await signInAs(page, "viewer@halftrip.test");
  await page.goto(`/alarms/setpoints/${tank.tank.id}`);
  await expect(page.getByRole("group", { name: "H setpoint", exact: true }).getByLabel("H (m)", { exact: true })).toBeDisabled();
  await expect(page.getByRole("button", { name: "Save setpoints" })).toHaveCount(0);
});

test("the on-call editor adds, reorders and removes people, and saves the escalation order", async ({ page }) => {
  const [technician, operatorId] = await userIds(["technician@halftrip.test", "operator@halftrip.test"]);
  const order = async () => ((await operator.get(`/api/sites/${tank.site.id}/on-call`).expect(200)).body.entries as { user_id: string }[]).map((e) => e.user_id);
  await signInAs(page, "operator@halftrip.test");
  await page.goto(`/alarms/on-call/${tank.site.id}`);
  const list = page.getByRole("list", { name: "On call, in escalation order" });
  await expect(list.getByRole("listitem")).toHaveCount(1);
  await expect(list.getByRole("listitem").first()).toContainText("technician@halftrip.test");

  await page.getByLabel("Add a person").selectOption(operatorId);
  await page.getByRole("button", { name: "Add", exact: true }).click();
  await expect(list.getByRole("listitem")).toHaveCount(2);
  await page.getByRole("button", { name: "Move operator@halftrip.test up" }).click();
  await expect(list.getByRole("listitem").first()).toContainText("operator@halftrip.test");
  await page.getByRole("button", { name: "Save the list" }).click();
  await expect(page.getByRole("status").filter({ hasText: "On-call list saved." })).toBeVisible({ timeout: 30_000 });
  expect(await order()).toEqual([operatorId, technician]);

  await page.getByRole("button", { name: "Remove operator@halftrip.test" }).click();
  await page.getByRole("button", { name: "Save the list" }).click();
  await expect(page.getByRole("status").filter({ hasText: "On-call list saved." })).toBeVisible({ timeout: 30_000 });
  expect(await order()).toEqual([technician]);
});

test("exports: the measurements and alarm-event CSVs download with their documented columns", async ({ page }) => {
  await signInAs(page, "operator@halftrip.test");
  await page.goto("/exports");
  const measurements = page.getByRole("region", { name: "Measurements" });
  await measurements.getByLabel("Site", { exact: true }).selectOption({ label: tank.site.name });
  await measurements.getByRole("checkbox", { name: new RegExp(tank.tank.name) }).check();
  const [download] = await Promise.all([page.waitForEvent("download"), measurements.getByRole("link", { name: "Download measurements CSV" }).click()]);
  const { header, rows } = csvByName(fs.readFileSync((await download.path())!, "utf8"));
  // The measurement fields of PRODUCT.md's management API, each a column of the export.
  for (const column of ["at", "status", "tof_us", "air_temp_c", "speed_of_sound_ms", "distance_m", "level_m", "volume_l", "fill_pct", "occupied", "uncertainty_m"]) {
    expect(header).toContain(column);
  }
  // The nine readings of provisionTankInAlarm, all of this tank.
  expect(rows).toHaveLength(9);
  expect(new Set(rows.map((r) => r.asset))).toEqual(new Set([tank.tank.name]));

  const alarms = page.getByRole("region", { name: "Alarm events" });
  const [alarmFile] = await Promise.all([page.waitForEvent("download"), alarms.getByRole("link", { name: "Download alarm events CSV" }).click()]);
  const events = csvByName(fs.readFileSync((await alarmFile.path())!, "utf8"));
  expect(events.header.length).toBeGreaterThan(3);
  expect(events.rows.some((r) => Object.values(r).includes(tank.tank.name))).toBe(true);
});
