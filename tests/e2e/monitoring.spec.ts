import { expect, test } from "@playwright/test";
import { signInAs } from "../support/browser";
import { signedIn } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { runWorkerOnce } from "../support/worker";

// An operator watches the fleet: the overview, then a site with its tank's sounding strip, then the
// tank's trend with a chosen period. Data is provisioned through the management API, readings go
// through the device API and the worker runs once, as in production.

let fleet: Awaited<ReturnType<typeof createTankWithDevice>>;


test.beforeAll(async ({ request }) => {
  const admin = await signedIn("admin@halftrip.test");
  fleet = await createTankWithDevice(admin);
  // Setpoints on the 2.8 m tank; the draw-down below crosses L = 1.90 m, so its L alarm needs attention.
  const setpoints = await admin.put(`/api/assets/${fleet.tank.id}/setpoints`).send({
    unit: "m",
    setpoints: { hh: { value: 2.7 }, h: { value: 2.5 }, l: { value: 1.9, priority: "high", on_delay_s: 0 }, ll: { value: 0.5 } },
  });
  expect(setpoints.status).toBe(200);
  // A tank drawn down over the last two hours: from 1.00064 m to 1.20 m below the sensor (REFERENCES.md §2: 5 831 µs at 20 °C).
  const start = Date.now() - 2 * 3600_000;
  const readings = Array.from({ length: 12 }, (_, i) => ({ seq: i + 1, at: new Date(start + i * 600_000).toISOString(), channel: 0, echo_us: 5831 + i * 105, air_temp_c: 20 }));
  const sent = await request.post("/api/v1/readings", { headers: { Authorization: `Bearer ${fleet.apiKey}` }, data: { readings } });
  expect(sent.status()).toBe(202);
  await runWorkerOnce();
});

test("an operator opens the overview, a site and a tank's trend", async ({ page }) => {
  await signInAs(page, "operator@halftrip.test");
  const card = page.getByRole("region", { name: fleet.site.name });
  await expect(card).toBeVisible();
  const row = card.getByRole("row", { name: new RegExp(fleet.tank.name) });
  await expect(row).toContainText("%");
  await expect(row).toContainText(/\d\u202f?\d*\u00a0L/);
  await expect(card).toContainText("none offline");

  await card.getByRole("link", { name: fleet.site.name }).click();
  await expect(page.getByRole("heading", { level: 1, name: fleet.site.name })).toBeVisible();
  await expect(page.getByRole("heading", { name: "Alarms needing attention" })).toBeVisible();
  await expect(page.getByRole("note")).toContainText("not an overfill-prevention or safety system");
  const tank = page.getByRole("article", { name: fleet.tank.name });
  await expect(tank.getByTestId("tank-level")).toContainText(/\d\.\d+\u00a0m ±\u00a0[\d.]+\u00a0mm/);
  // The strip carries the setpoints; the one in alarm says so (in words for the screen reader, a glyph on screen).
  await expect(tank.getByRole("img", { name: new RegExp(`^${fleet.tank.name}: Level`) })).toHaveAttribute("aria-label", /L at 1\.900\u00a0m \(high alarm\)/);

  // The alarm row: glyph and priority word, what and where, the state in words; the operator acknowledges it here.
  const alarm = page.getByTestId("alarm-row").filter({ hasText: "L level" });
  await expect(alarm).toContainText("High");
  await expect(alarm).toContainText(fleet.tank.name);
  await expect(alarm).toContainText("Unacknowledged");
  await alarm.getByRole("button", { name: /^Acknowledge L level/ }).click();
  await expect(alarm).toContainText("Acknowledged");
  await expect(alarm.getByRole("button", { name: /Acknowledge/ })).toHaveCount(0);

  await tank.getByRole("link", { name: fleet.tank.name }).click();
  await expect(page.getByRole("heading", { level: 1, name: fleet.tank.name })).toBeVisible();
  await expect(page.getByRole("navigation", { name: "Breadcrumb" })).toContainText(fleet.site.name);
  await expect(page.getByTestId("asset-level")).toContainText("m ±");
  await expect(page.getByTestId("level-trend")).toBeVisible();
  await expect(page.getByTestId("level-trend")).toHaveAttribute("aria-label", /Level of .* points \(each measurement\)/);

  // A week comes from the 5-minute rollups, and the choice is kept in the URL.
  await page.getByText("7 days", { exact: true }).click();
  await expect(page).toHaveURL(/range=7d/);
  await expect(page.getByTestId("level-trend")).toHaveAttribute("aria-label", /5-minute means/);

  // A range of one's own: an end before the start is explained, a good one goes into the URL.
  await page.getByText("Range…", { exact: true }).click();
  await page.getByLabel("From", { exact: true }).fill("2026-01-02T00:00");
  await page.getByLabel("To", { exact: true }).fill("2026-01-01T00:00");
  await page.getByRole("button", { name: "Show range" }).click();
  await expect(page.getByRole("alert").filter({ hasText: "end must come after the start" })).toBeVisible();
  await page.getByLabel("To", { exact: true }).fill("2026-01-05T00:00");
  await page.getByRole("button", { name: "Show range" }).click();
  await expect(page).toHaveURL(/from=.*&to=/);
  await page.reload();
  await expect(page.getByLabel("From", { exact: true })).toHaveValue("2026-01-02T00:00");
});

test("at phone width the site stacks its cards and the menu folds", async ({ page }) => {
  await page.setViewportSize({ width: 390, height: 844 });
  await signInAs(page, "viewer@halftrip.test");
  await page.goto(`/sites/${fleet.site.id}`);
  await expect(page.getByRole("button", { name: "Menu" })).toBeVisible();
  const tank = page.getByRole("article", { name: fleet.tank.name });
  await expect(tank).toBeVisible();
  const box = await tank.boundingBox();
  expect(box && box.width).toBeLessThanOrEqual(390);
  // A viewer sees the alarm but is offered no action.
  await expect(page.getByTestId("alarm-row").filter({ hasText: "L level" })).toBeVisible();
  await expect(page.getByRole("button", { name: /Acknowledge/ })).toHaveCount(0);
  await expect(page.getByRole("link", { name: "Edit site" })).toHaveCount(0);
});
