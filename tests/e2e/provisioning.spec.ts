import { expect, test } from "@playwright/test";
import { signInAs } from "../support/browser";


test.use({ permissions: ["clipboard-read", "clipboard-write"] });


test("an admin provisions a site, a tank and a device, and the device's key sends a reading", async ({ page }) => {
  const stamp = Date.now();
  const siteName = `E2E site ${stamp}`;
  const tankName = `E2E tank ${stamp}`;
  const deviceName = `E2E unit ${stamp}`;
  await signInAs(page, "admin@halftrip.test");

  await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Sites" }).click();
  await page.getByRole("link", { name: "Add a site" }).click();
  await page.getByLabel("Name", { exact: true }).fill(siteName);
  await page.getByLabel("Time zone").fill("Europe/Dublin");
  await page.getByLabel("Fixed air temperature (°C)").fill("12");
  await page.getByRole("button", { name: "Add site" }).click();
  // After creating, the app shows what was created.
  await expect(page).toHaveURL(/\/sites\/[0-9a-f-]{36}$/);
  await expect(page.getByRole("heading", { name: siteName })).toBeVisible();
  await page.goto("/sites");
  await expect(page.getByRole("row", { name: new RegExp(siteName) })).toContainText("Europe/Dublin");

  await page.goto("/assets/new");
  // The shared schema is checked before anything is sent; its messages sit beside their fields.
  await page.getByRole("button", { name: "Add asset" }).click();
  await expect(page.getByText("Choose the site.")).toBeVisible();
  await expect(page.getByText("Give the asset a name.")).toBeVisible();
  await page.getByLabel("Site").selectOption({ label: siteName });
  await page.getByLabel("Name", { exact: true }).fill(tankName);
  await page.getByLabel("Shape").selectOption("rectangular");
  await page.getByLabel("Length (m)", { exact: true }).fill("2");
  // A decimal comma is read as the decimal separator: 1,5 m, not 15 m.
  await page.getByLabel("Width (m)", { exact: true }).fill("1,5");
  await page.getByLabel("Height (m)", { exact: true }).fill("1");
  // 2 m × 1.5 m × 1 m = 3 m³ = 3000 L, by hand.
  const capacity = page.getByTestId("live-capacity");
  await expect(capacity).toContainText(/3\u202f000\u00a0L/);
  await expect(capacity).toContainText("computed: V = l·w·h");
  await expect(capacity).toContainText("1.000 m");
  await page.getByLabel("Sensor mounting height (m)").fill("1.2");
  await page.getByLabel("Safe fill (%)").fill("95");
  await expect(page.getByRole("note")).toContainText("not an overfill-prevention or safety system");
  await page.getByRole("button", { name: "Add asset" }).click();
  await expect(page).toHaveURL(/\/assets\/[0-9a-f-]{36}$/);
  await expect(page.getByRole("heading", { name: tankName })).toBeVisible();
  await page.goto("/assets");
  const tankRow = page.getByRole("row", { name: new RegExp(tankName) });
  await expect(tankRow).toContainText(/3\u202f000\u00a0L/);
  // Asset names in the list lead to their pages.
  await expect(tankRow.getByRole("link", { name: tankName, exact: true })).toHaveAttribute("href", /\/assets\/[0-9a-f-]{36}$/);

  await page.goto("/devices/new");
  await page.getByLabel("Site").selectOption({ label: siteName });
  await page.getByLabel("Serial").fill(`E2E-${stamp}`);
  await page.getByLabel("Name", { exact: true }).fill(deviceName);
  await page.getByLabel("Asset").selectOption({ label: `${tankName} (tank)` });
  await page.getByRole("button", { name: "Add device" }).click();
  await expect(page.getByText("You will not see it again")).toBeVisible();
  const key = (await page.getByTestId("device-api-key").textContent())?.trim() ?? "";
  expect(key).toMatch(/^ht_[0-9a-f]{12}_[A-Za-z0-9_-]{43}$/);
  await page.getByRole("button", { name: "Copy key" }).click();
  await expect(page.getByRole("status").filter({ hasText: "Copied" })).toBeVisible();
  expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(key);

  const sent = await page.request.post("/api/v1/readings", {
    headers: { Authorization: `Bearer ${key}` },
    data: { readings: [{ seq: 1, channel: 0, echo_us: 5831 }] },
  });
  expect(sent.status()).toBe(202);
  expect((await sent.json()).accepted).toBe(1);

  await page.getByRole("link", { name: "Open the device page" }).click();
  await expect(page.getByRole("heading", { name: deviceName })).toBeVisible();
  await expect(page.getByRole("region", { name: "Channels" })).toContainText(`${tankName} (tank)`);
  await expect(page.getByRole("region", { name: "Keys" })).toContainText(key.slice(0, 15));

  // Revoking goes through a confirmation dialog; afterwards the key is refused.
  await page.getByRole("button", { name: "Revoke key" }).click();
  const dialog = page.getByRole("dialog", { name: "Revoke this device's key?" });
  await expect(dialog).toBeVisible();
  await dialog.getByRole("button", { name: "Revoke key" }).click();
  await expect(dialog).toBeHidden();
  await expect(page.getByText("The key is revoked")).toBeVisible();
  await expect(page.getByText("No active key")).toBeVisible();
  const refused = await page.request.post("/api/v1/readings", {
    headers: { Authorization: `Bearer ${key}` },
    data: { readings: [{ seq: 2, channel: 0, echo_us: 5831 }] },
  });
  expect(refused.status()).toBe(401);
});

test("a viewer sees the lists but no create or edit controls", async ({ page }) => {
  await signInAs(page, "viewer@halftrip.test");
  for (const [path, title, add] of [
    ["/sites", "Sites", "Add a site"],
    ["/assets", "Assets", "Add an asset"],
    ["/devices", "Devices", "Add a device"],
  ] as const) {
    await page.goto(path);
    await expect(page.getByRole("heading", { name: title, exact: true })).toBeVisible();
    await expect(page.getByRole("region", { name: title })).toBeVisible();
    await expect(page.getByRole("status")).toHaveCount(0);
    await expect(page.getByRole("link", { name: add })).toHaveCount(0);
    await expect(page.getByRole("link", { name: /^Edit / })).toHaveCount(0);
  }
  await page.goto("/devices/new");
  await expect(page).toHaveURL(/\/forbidden/);
});
