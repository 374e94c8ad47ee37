import { expect, test, type Page } from "@playwright/test";
import { unit as mathUnit } from "mathjs";
import { signInAs } from "../support/browser";
import { signInAgent, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { createOtherOrganisation, sql } from "../support/db";
import { runWorkerOnce } from "../support/worker";
import { expectFitsPhone, PHONE } from "../support/phone";
import { sendEchoReadings } from "../api/calibration-readings";

// Issue 15 §5: a US-customary organisation end to end, and each unit system round-tripped through a form.
// The organisation is one of its own, so no other test reads its settings. Conversions checked against
// mathjs and the exact definitions (1 in = 25.4 mm, 1 US gal = 231 in³: NIST SP 811, Appendix B).
let org: Awaited<ReturnType<typeof createOtherOrganisation>>;
let admin: Agent;
let fleet: Awaited<ReturnType<typeof createTankWithDevice>>;

test.beforeAll(async () => {
  org = await createOtherOrganisation();
  admin = (await signInAgent(org.adminEmail, org.password)).agent;
  // The test tank: rectangular 2 m × 1.5 m × 2.8 m, sensor 3 m above the bottom (tests/support/fleet.ts).
  // US customary for the organisation from the start (the first test sets it again through the page), so
  // each test stands on its own when Playwright starts a fresh worker after a failure.
  await admin.patch("/api/organisation/display-settings").send({ unit_system: "us", clock: "12h" }).expect(200);
  fleet = await createTankWithDevice(admin);
  // Reorder at 60 %: the tank, 45 % full, is due now on the refill plan.
  await admin.patch(`/api/assets/${fleet.tank.id}`).send({ reorder_pct: 60 }).expect(200);
  const now = Date.now();
  await sendEchoReadings(fleet.apiKey, Array.from({ length: 6 }, (_, i) => ({ at: new Date(now - (6 - i) * 60_000), distanceM: 3 - 1.25 })));
  await runWorkerOnce();
});

const SAVED = { timeout: 60_000 };

async function heightM(): Promise<number> {
  const [row] = await sql<{ geometry: { height_m: number } }>(`SELECT geometry FROM assets WHERE id = $1`, [fleet.tank.id]);
  return row.geometry.height_m;
}

async function saveSettings(page: Page, form: "Organisation" | "Your own", values: Record<string, string>) {
  await page.goto("/settings");
  const f = page.getByRole("form", { name: form });
  for (const [label, value] of Object.entries(values)) await f.getByLabel(label, { exact: true }).selectOption(value);
  await f.getByRole("button", { name: "Save" }).click();
  await expect(f.getByRole("status")).toContainText("Saved", { timeout: 30_000 });
}

test("a US-customary admin enters a tank height in feet and inches and a setpoint in inches, reads them back, and SI is stored", async ({ page }) => {
  await signInAs(page, org.adminEmail, org.password);
  await saveSettings(page, "Organisation", { Units: "us", Clock: "12h" });

  await page.goto(`/assets/${fleet.tank.id}/edit`);
  const height = page.getByLabel("Height (ft)", { exact: true });
  // 2.8 m = 9.18635 ft (mathjs), shown to 0.0001 ft.
  expect(mathUnit(2.8, "m").toNumber("ft")).toBeCloseTo(9.1864, 4);
  await expect(height).toHaveValue("9.1864");
  await height.fill("9 ft 6 in");
  await page.getByRole("button", { name: "Save asset" }).click();
  await expect(page).toHaveURL(new RegExp(`/assets/${fleet.tank.id}$`), SAVED);
  // 9 ft 6 in = 9.5 ft = 2.8956 m (1 ft = 0.3048 m exactly; mathjs).
  await expect.poll(heightM).toBeCloseTo(mathUnit(9.5, "ft").toNumber("m"), 9);
  // The asset page writes the level in feet with its uncertainty in inches: 1.25 m = 4.10 ft (mathjs).
  await expect(page.getByTestId("asset-level")).toContainText(/4\.1\d*\u00a0ft ±\u00a0[\d.]+\u00a0in/, SAVED);
  await page.goto(`/assets/${fleet.tank.id}/edit`);
  await expect(page.getByLabel("Height (ft)", { exact: true })).toHaveValue("9.5");

  await page.goto(`/alarms/setpoints/${fleet.tank.id}`);
  const h = page.getByRole("group", { name: "H setpoint", exact: true });
  await h.getByLabel("H setpoint", { exact: true }).selectOption("on");
  await h.getByLabel("H (ft)", { exact: true }).fill("80 in");
  await page.getByRole("button", { name: "Save setpoints" }).click();
  await expect(page.getByRole("status").filter({ hasText: "Setpoints saved." })).toBeVisible(SAVED);
  // 80 in = 2.032 m (1 in = 25.4 mm exactly), stored in metres; read back as 6.6667 ft.
  const saved = (await admin.get(`/api/assets/${fleet.tank.id}/setpoints`).expect(200)).body.setpoints;
  expect(saved.h.value_m).toBeCloseTo(mathUnit(80, "inch").toNumber("m"), 9);
  await expect(h.getByLabel("H (ft)", { exact: true })).toHaveValue("6.6667");
});

test("a US-customary organisation's overview, site, refill plan and exports speak US gallons and feet", async ({ page }) => {
  await signInAs(page, org.adminEmail, org.password);
  // Capacity 2 m × 1.5 m × the stored height, in US gallons by mathjs, to four significant figures
  // (2.8 m: 8 400 L = 2 219 gal; 2.8956 m: 8 686.8 L = 2 295 gal).
  const gallons = Math.round(mathUnit(3 * (await heightM()) * 1000, "L").toNumber("gallon"));
  const capacity = `${Math.floor(gallons / 1000)}\u202f${String(gallons % 1000).padStart(3, "0")}\u00a0gal`;
  await page.goto("/");
  await expect(page.getByRole("main")).toContainText(/\d\u00a0gal/);
  await page.goto(`/sites/${fleet.site.id}`);
  await expect(page.getByRole("main")).toContainText(capacity);
  await expect(page.getByRole("main")).toContainText(/\u00a0ft/);
  await page.goto("/refill-plan");
  await expect(page.getByRole("row", { name: new RegExp(fleet.tank.name) })).toContainText(/\d\u00a0gal/, SAVED);

  await page.goto("/exports");
  await expect(page.getByLabel(/US customary/)).toBeChecked();
  const href = await page.getByRole("link", { name: "Download refill plan CSV" }).getAttribute("href");
  expect(href).toContain("units=us");
  const us = await (await page.request.get(href!)).text();
  expect(us.split("\n")[0]).toContain("capacity_gal");
  await page.getByLabel(/^SI/).check();
  const siHref = await page.getByRole("link", { name: "Download refill plan CSV" }).getAttribute("href");
  expect((await (await page.request.get(siHref!)).text()).split("\n")[0]).toContain("capacity_l");
});

test("a user's own SI with a decimal comma overrides the organisation's units in a form, and metres are stored", async ({ page }) => {
  await signInAs(page, org.adminEmail, org.password);
  await saveSettings(page, "Your own", { Units: "si", "Decimal separator": "," });
  await page.goto(`/assets/${fleet.tank.id}/edit`);
  const height = page.getByLabel("Height (m)", { exact: true });
  await expect(height).toHaveValue(String(await heightM()).replace(".", ","));
  await height.fill("2,75");
  await page.getByRole("button", { name: "Save asset" }).click();
  await expect(page).toHaveURL(new RegExp(`/assets/${fleet.tank.id}$`), SAVED);
  await expect.poll(heightM).toBe(2.75);
  await expect(page.getByTestId("asset-level")).toContainText(/1,25\d*\u00a0m ±/, SAVED);
  // Back to the organisation's, for the tests after this one.
  await saveSettings(page, "Your own", { Units: "", "Decimal separator": "" });
});

test.describe("at 390 px", () => {
  test.use({ viewport: PHONE });
  test("the units page fits a phone", async ({ page }, testInfo) => {
    await signInAs(page, org.adminEmail, org.password);
    await page.goto("/settings");
    await expect(page.getByRole("form", { name: "Organisation" })).toBeVisible();
    await expectFitsPhone(page, testInfo, "units-settings");
  });
});
