import { expect, test } from "@playwright/test";
import { signInAs } from "../support/browser";
import { createTankWithDevice } from "../support/fleet";
import { signedIn } from "../support/session";
import { runWorkerOnce } from "../support/worker";
import { sendEchoReadings } from "../api/calibration-readings";
import { TANK_MOUNT_M } from "../support/field-fleet";

// An alarm flood as an operator meets it (issue 13): a tank whose level swings across its H setpoint,
// each swing seen live by the worker, re-alarms more than 10 times in 10 minutes — a flood by the
// ISA-18.2 benchmark (REFERENCES.md §4). The site page says so in a banner and groups its alarms by
// cause; the banner's link opens the alarms table with the suppressed ones shown.

const SWINGS = 16;

let site: { id: string; name: string };

test.beforeAll(async () => {
  test.setTimeout(420_000);
  const admin = await signedIn("admin@halftrip.test");
  const fleet = await createTankWithDevice(admin, { device: { expected_interval_s: 3600 } });
  site = fleet.site;
  // No one on call: the swings are annunciated on the screens only.
  await admin.put(`/api/assets/${fleet.tank.id}/setpoints`).send({ setpoints: { h: { value: 2.0, deadband_m: 0.1, on_delay_s: 0, priority: "medium" } } }).expect(200);
  // Each level reaches the worker before the next (a swing the worker never saw would be history, not an activation).
  // Readings stamped as they are sent (at least 1 s apart). The first few jumps of 0.7 m are marked
  // suspect by the spike check and judge no alarm, so 16 swings give a dozen activations or so.
  let at = 0;
  for (let i = 0; i < SWINGS; i++) {
    for (const level of [1.5, 2.2]) {
      at = Math.max(Date.now(), at + 1000);
      await sendEchoReadings(fleet.apiKey, [{ at: new Date(at), distanceM: TANK_MOUNT_M - level }]);
      await runWorkerOnce();
    }
  }
});

for (const viewport of [
  { name: "desktop", width: 1440, height: 900 },
  { name: "phone", width: 390, height: 844 },
]) {
  test(`a site in an alarm flood says so and groups its alarms by cause (${viewport.name})`, async ({ page }) => {
    await page.setViewportSize(viewport);
    await signInAs(page, "operator@halftrip.test");
    await page.goto(`/sites/${site.id}`);
    const banner = page.getByRole("alert").filter({ hasText: "Alarm flood" });
    await expect(banner).toContainText("alarms in the last 10 minutes");
    const count = Number((await banner.textContent())?.match(/(\d+) alarms in the last 10 minutes/)?.[1]);
    expect(count).toBeGreaterThan(10);
    await expect(banner).toContainText("more than 10 alarms in 10 minutes");
    const byCause = page.getByRole("region", { name: "Alarms by cause" });
    await expect(byCause.getByRole("listitem")).toHaveCount(1);
    await expect(byCause.getByRole("listitem")).toContainText("1 alarm: 1 need attention");
    // Readable on a phone: nothing scrolls sideways.
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(viewport.width);
    await page.screenshot({ path: test.info().outputPath(`alarm-flood-${viewport.name}.png`), fullPage: true });

    await banner.getByRole("link", { name: "See alarms by cause" }).click();
    await expect(page).toHaveURL(new RegExp(`/alarms\\?include=suppressed&site_id=${site.id}`), { timeout: 30_000 });
    await expect(page.getByRole("alert").filter({ hasText: "Alarm flood" })).toBeVisible();
  });
}
