import { expect, test } from "@playwright/test";
import { signedIn } from "../support/session";
import { signInAs } from "../support/browser";
import { createTankWithDevice } from "../support/fleet";
import { runWorkerOnce } from "../support/worker";
import { sendEchoReadings, type SentReading } from "../api/calibration-readings";

// Issue 6, browser test: a technician records two dips, previews and applies a calibration.
test.use({ timezoneId: "UTC" });

const HOUR = 3_600_000;
const MOUNT = 3;

/** datetime-local text for a UTC instant (the browser runs in UTC here). */
const localInput = (t: number) => new Date(t).toISOString().slice(0, 16);

test("a technician records two dips, previews and applies a calibration", async ({ page }) => {
  test.setTimeout(180_000);
  const admin = await signedIn("admin@halftrip.test");
  const fleet = await createTankWithDevice(admin);
  // The level falls from 2.0 m to 0.8 m over the last six hours; the sensor reads 2 % long (invented).
  const start = Math.floor((Date.now() - 6 * HOUR) / 60_000) * 60_000;
  const levelAt = (t: number) => 2.0 - (1.2 * (t - start)) / (6 * HOUR);
  const readings: SentReading[] = Array.from({ length: 36 }, (_, i) => {
    const t = start + i * 10 * 60_000;
    return { at: new Date(t), distanceM: 1.02 * (MOUNT - levelAt(t)) };
  });
  await sendEchoReadings(fleet.apiKey, readings);
  await runWorkerOnce();

  await signInAs(page, "technician@halftrip.test");
  await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Calibration" }).click();
  await expect(page.getByRole("heading", { name: "Calibration", exact: true })).toBeVisible();
  await page.getByLabel("Site").selectOption({ label: fleet.site.name });
  await page.getByRole("link", { name: fleet.tank.name }).click();
  await expect(page.getByRole("heading", { name: `${fleet.tank.name}: dips and calibration` })).toBeVisible();
  await expect(page.getByRole("note").filter({ hasText: "tank-top work and confined spaces follow the site's safety rules" })).toBeVisible();

  for (const t of [start + HOUR, start + 5 * HOUR]) {
    await page.getByLabel("Dipped level (m)").fill(levelAt(t).toFixed(3));
    await page.getByLabel("Time of the dip").fill(localInput(t));
    await page.getByLabel("Note").fill("tape");
    await page.getByRole("button", { name: "Record the dip" }).click();
    await expect(page.getByRole("status").filter({ hasText: `Recorded a dip of ${levelAt(t).toFixed(3)} m` })).toBeVisible();
  }
  const dips = page.getByRole("region", { name: "Dips beside the sensor" });
  await expect(dips.getByRole("checkbox")).toHaveCount(2);
  // Beside each dip, the sensor's level then: it reads low by 2 % of the distance (by hand: 2 % of 1.2 m and of 2.0 m).
  await expect(dips.getByRole("row")).toHaveCount(3);
  await expect(dips).toContainText("\u221224.0\u00a0mm");
  await expect(dips).toContainText("\u221240.0\u00a0mm");

  for (const box of await dips.getByRole("checkbox").all()) await box.check();
  await page.getByRole("button", { name: "Preview calibration" }).click();
  const preview = page.getByTestId("calibration-preview");
  await expect(preview).toContainText("Preview from 2 dips (offset and scale)");
  // Inverting raw = 1.02·true: scale 1/1.02 = 0.98039 (by hand), to the 0.1 µs of the echo times and the mm of the dips.
  await expect(preview).toContainText(/Scale1\.000000\.980[34]\d/);
  await expect(preview.getByRole("img", { name: /Level as measured now/ })).toBeVisible();

  await page.getByLabel("Note for the history").fill("annual check");
  await page.getByRole("button", { name: "Apply calibration" }).click();
  await expect(page.getByRole("status").filter({ hasText: "Calibration applied" })).toBeVisible();
  const history = page.getByRole("region", { name: "Calibration history" });
  await expect(history).toContainText("annual check");
  await expect(history.getByTestId("current-calibration")).toContainText(/scale 0\.980[34]\d/);

  // A wrong dip is voided with a reason: it stays listed, struck through, and can no longer be chosen.
  await dips.getByRole("button", { name: /^Void the dip of/ }).first().click();
  await page.getByRole("button", { name: "Void the dip", exact: true }).click();
  await expect(page.getByText("Say why the dip is void")).toBeVisible();
  await page.getByLabel("Why is it void?").fill("tape read at the wrong mark");
  await page.getByRole("button", { name: "Void the dip", exact: true }).click();
  const voided = dips.locator('tr[data-void="true"]');
  await expect(voided).toHaveCount(1);
  await expect(voided).toContainText("Void: tape read at the wrong mark");
  await expect(voided.getByRole("checkbox")).toBeDisabled();
});
