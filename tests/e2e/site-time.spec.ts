import { expect, test } from "@playwright/test";
import { signInAs } from "../support/browser";
import { signedIn } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { sql } from "../support/db";

// Issue 15 "Site time everywhere": an alarm at a Europe/Dublin site, seen from a browser in Chicago,
// is written in Dublin's clock with Dublin's zone; the viewer may switch to their own clock.
test.use({ timezoneId: "America/Chicago" });

// 2026-01-15 06:30 UTC. In January Dublin keeps GMT (UTC+0) and Chicago CST (UTC−6), per the IANA
// tz database (from memory): 06:30 GMT at the site, 00:30 GMT−6 in the browser.
const ACTIVATED = "2026-01-15T06:30:00Z";

async function dublinAlarm() {
  const admin = await signedIn("admin@halftrip.test");
  // createTankWithDevice makes its site through POST /api/sites with time_zone Europe/Dublin.
  const fleet = await createTankWithDevice(admin);
  expect(fleet.site.time_zone).toBe("Europe/Dublin");
  const [org] = await sql<{ organisation_id: string }>(`SELECT organisation_id FROM sites WHERE id = $1`, [fleet.site.id]);
  const [alarm] = await sql<{ id: string }>(
    `INSERT INTO alarms (organisation_id, site_id, asset_id, kind, priority, state, condition_active, value, setpoint, unit, activated_at)
     VALUES ($1, $2, $3, 'h', 'medium', 'unacknowledged', true, 2.2, 2.0, 'm', $4) RETURNING id`,
    [org.organisation_id, fleet.site.id, fleet.tank.id, ACTIVATED],
  );
  return alarm.id;
}

for (const width of [1280, 390]) {
  test(`an alarm at a Dublin site is shown in Dublin time to a Chicago browser (${width} px)`, async ({ page }) => {
    await page.setViewportSize({ width, height: 900 });
    const id = await dublinAlarm();
    await signInAs(page, "operator@halftrip.test");
    await page.goto(`/alarms/${id}`);
    const began = page.locator("p", { hasText: /^Began$/ }).locator("xpath=following-sibling::p[1]");
    await expect(began).toHaveText("15 Jan 2026, 06:30 GMT");

    await page.getByLabel("Times in").selectOption("mine");
    await expect(began).toHaveText("15 Jan 2026, 00:30 GMT-6");
    // The choice is the viewer's and outlives the page.
    await page.reload();
    await expect(began).toHaveText("15 Jan 2026, 00:30 GMT-6");
    await page.getByLabel("Times in").selectOption("site");
    await expect(began).toHaveText("15 Jan 2026, 06:30 GMT");
  });
}
