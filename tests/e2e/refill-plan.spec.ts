import { readFile } from "node:fs/promises";
import { expect, test } from "@playwright/test";
import { signedIn } from "../support/session";
import { signInAs } from "../support/browser";
import { createTankWithDevice } from "../support/fleet";
import { runWorkerOnce } from "../support/worker";
import { csvByName } from "../support/csv";
import { PHONE, expectFitsPhone } from "../support/phone";
import { levelHistory, sendEchoReadings } from "../api/calibration-readings";

// Issue 6, browser test: a viewer (a delivery partner) sees the refill plan and exports it, and is
// offered no action. Issue 15: a tank with a sensor fault is listed as needing a check, with the
// reason, and not scheduled. Fixtures: hourly readings over 72 h dated from one instant, from devices
// that report hourly (so the last value is not stale while the test runs).
const END = new Date(Math.floor(Date.now() / 60_000) * 60_000 - 2 * 60_000);
const HOURLY = { device: { expected_interval_s: 3600 } };

test("a viewer sees the refill plan and downloads it, with no action offered", async ({ page }) => {
  test.setTimeout(120_000);
  const admin = await signedIn("admin@halftrip.test");
  const fleet = await createTankWithDevice(admin, HOURLY);
  // 0.5 m in the 3 m² tank of tests/support/fleet.ts: 1 500 L of 8 400 L, below its 25 % reorder level;
  // 90 % safe fill is 7 560 L, so 6 060 L to deliver (computed).
  await sendEchoReadings(fleet.apiKey, levelHistory(3, END, 72, 0.5, 0.5));
  await runWorkerOnce();

  await signInAs(page, "viewer@halftrip.test");
  const nav = page.getByRole("navigation", { name: "Main" });
  await expect(nav.getByRole("link", { name: "Imports" })).toHaveCount(0);
  await expect(nav.getByRole("link", { name: "Calibration" })).toHaveCount(0);
  await nav.getByRole("link", { name: "Refill plan" }).click();
  await expect(page.getByRole("heading", { name: "Refill plan", exact: true })).toBeVisible();

  const plan = page.getByRole("region", { name: "Refill plan" });
  const row = plan.getByRole("row").filter({ hasText: fleet.tank.name });
  await expect(row).toContainText("reorder now: below the reorder level");
  await expect(row).toContainText("6\u202f060\u00a0L");
  await expect(row).toContainText("18\u00a0%");

  await page.getByLabel("Horizon").selectOption("30");
  await expect(page).toHaveURL(/horizon_days=30/);
  await expect(row).toBeVisible();

  // Nothing to do here but read and download: no buttons in the page itself, no forms.
  const main = page.getByRole("main");
  await expect(main.getByRole("button")).toHaveCount(0);
  await expect(main.locator("form")).toHaveCount(0);

  const [download] = await Promise.all([page.waitForEvent("download"), main.getByRole("link", { name: "Download CSV" }).click()]);
  expect(download.suggestedFilename()).toMatch(/^refill-plan-30-days-\d{4}-\d{2}-\d{2}\.csv$/);
  const text = await readFile((await download.path())!, "utf8");
  const { header, rows } = csvByName(text);
  expect(header).toEqual(expect.arrayContaining(["site", "tank", "purpose", "status", "action", "days_to_due", "asset_id"]));
  expect(rows.find((r) => r.asset_id === fleet.tank.id)).toMatchObject({ site: fleet.site.name, tank: fleet.tank.name, purpose: "supply", status: "due_now", action: "deliver", days_to_due: "0" });
});

test("a tank whose sensor is stuck is listed as needing a check, with the reason, and not scheduled", async ({ page }, testInfo) => {
  test.setTimeout(120_000);
  const admin = await signedIn("admin@halftrip.test");
  const stuck = await createTankWithDevice(admin, HOURLY);
  // 72 hourly readings of exactly the same echo time at 0.6 m (below the reorder level): the worker flags it stuck.
  await sendEchoReadings(stuck.apiKey, levelHistory(3, END, 72, 0.6, 0.6, { jitterM: 0 }));
  await runWorkerOnce();

  await signInAs(page, "viewer@halftrip.test");
  for (const size of [{ width: 1280, height: 900 }, PHONE]) {
    await page.setViewportSize(size);
    await page.goto("/refill-plan?horizon_days=14");
    const row = page.getByRole("region", { name: "Refill plan" }).getByRole("row").filter({ hasText: stuck.tank.name });
    await expect(row).toContainText("needs a check: Sensor flagged stuck");
    await expect(row).toContainText("not planned until checked");
    await expect(row).not.toContainText("reorder now");
    if (size === PHONE) await expectFitsPhone(page, testInfo, "refill-plan-needs-check");
  }

  // The tank's own page says the same.
  await page.goto(`/assets/${stuck.tank.id}`);
  await expect(page.getByTestId("tank-plan")).toContainText("needs a check: Sensor flagged stuck");
});
