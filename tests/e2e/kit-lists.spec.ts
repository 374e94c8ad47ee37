import { expect, test, type Locator } from "@playwright/test";
import { signInAs } from "../support/browser";
import { anonymous, signedIn, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { PHONE } from "../support/phone";

// The kit on the device screens: tables that sort from their headers (channels, keys) and become
// labelled cards on a phone, the device form reading a decimal comma through react-hook-form and the
// API's schema, revoking a key behind the kit's confirmation, and device health's URL read through
// its schema with "Clear filters".

let admin: Agent;
let fleet: Awaited<ReturnType<typeof createTankWithDevice>>;
// Channel index → maximum range sent (m). Sorted by range the indexes read 1, 0, 2.
const MAX_RANGE_M: Record<number, number> = { 0: 4, 1: 2.5, 2: 6 };
const keyPrefixes: string[] = [];

const prefixOf = (apiKey: string) => apiKey.split("_")[1];
// Round-trip echo of 1.2 m at 20 °C (t = 2·d/c, c = 343.2 m/s, REFERENCES.md §2).
const reading = (key: string, seq: number) =>
  anonymous().post("/api/v1/readings").set("Authorization", `Bearer ${key}`).send({ readings: [{ seq, channel: 0, echo_us: 6992.7, air_temp_c: 20 }] });

test.beforeAll(async () => {
  test.setTimeout(120_000);
  admin = await signedIn("admin@halftrip.test");
  fleet = await createTankWithDevice(admin, {
    device: { channels: Object.entries(MAX_RANGE_M).map(([index, max]) => ({ index: Number(index), max_range_m: max })) },
  });
  keyPrefixes.push(prefixOf(fleet.apiKey));
  // Two rotations: three keys, created one after the other, the first two revoked.
  for (let i = 0; i < 2; i++) {
    const rotated = await admin.post(`/api/devices/${fleet.device.id}/key`).expect(201);
    keyPrefixes.push(prefixOf(rotated.body.api_key));
    fleet.apiKey = rotated.body.api_key;
  }
});

const column = (table: Locator, label: string) => table.locator(`tbody td[data-label='${label}']`);
const texts = async (cells: Locator) => (await cells.allTextContents()).map((t) => t.trim());

test("the device's channels and keys sort from their headers, with aria-sort", async ({ page }) => {
  await signInAs(page, "viewer@halftrip.test");
  await page.goto(`/devices/${fleet.device.id}`);

  const channels = page.getByRole("region", { name: "Channels" });
  const maxRange = channels.getByRole("columnheader", { name: /Max range/ });
  await expect(maxRange).toHaveAttribute("aria-sort", "none");
  await expect.poll(() => texts(column(channels, "Index"))).toEqual(["0", "1", "2"]);
  await maxRange.getByRole("button").click();
  await expect(maxRange).toHaveAttribute("aria-sort", "ascending");
  await expect.poll(() => texts(column(channels, "Index"))).toEqual(["1", "0", "2"]);
  await maxRange.getByRole("button").click();
  await expect(maxRange).toHaveAttribute("aria-sort", "descending");
  await expect.poll(() => texts(column(channels, "Index"))).toEqual(["2", "0", "1"]);

  const keys = page.getByRole("region", { name: "Keys" });
  const created = keys.getByRole("columnheader", { name: /Created/ });
  const shownPrefixes = async () => (await texts(column(keys, "Prefix"))).map((p) => p.split("_")[1]);
  await created.getByRole("button").click();
  await expect(created).toHaveAttribute("aria-sort", "ascending");
  await expect.poll(shownPrefixes).toEqual(keyPrefixes);
  await created.getByRole("button").click();
  await expect(created).toHaveAttribute("aria-sort", "descending");
  await expect.poll(shownPrefixes).toEqual([...keyPrefixes].reverse());
  // The active key is the one shown as such.
  await expect(keys.getByRole("row", { name: new RegExp(keyPrefixes[2]) })).toContainText("active");
});

test.describe("at 390 px", () => {
  test.use({ viewport: PHONE });

  test("the channels table becomes one card per channel, each value beside its column's name", async ({ page }) => {
    await signInAs(page, "viewer@halftrip.test");
    await page.goto(`/devices/${fleet.device.id}`);
    const channels = page.getByRole("region", { name: "Channels" });
    await expect(column(channels, "Index")).toHaveCount(3);
    // The header row is left to screen readers; each cell names its column itself.
    const headerBox = await channels.locator("thead").boundingBox();
    expect(headerBox?.height ?? 0).toBeLessThanOrEqual(1);
    const firstRow = channels.locator("tbody tr").first();
    const [index, asset, max] = [firstRow.locator("td[data-label='Index']"), firstRow.locator("td[data-label='Asset']"), firstRow.locator("td[data-label='Max range']")];
    expect(await max.evaluate((td) => getComputedStyle(td, "::before").content)).toBe('"Max range"');
    // Stacked: one cell under the other, each as wide as the card, inside the phone's width.
    const [a, b, c] = [await index.boundingBox(), await asset.boundingBox(), await max.boundingBox()];
    expect(a && b && c).toBeTruthy();
    expect(b!.y).toBeGreaterThanOrEqual(a!.y + a!.height - 1);
    expect(c!.y).toBeGreaterThanOrEqual(b!.y + b!.height - 1);
    expect(Math.abs(a!.x - c!.x)).toBeLessThanOrEqual(1);
    expect(c!.x + c!.width).toBeLessThanOrEqual(PHONE.width);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);
  });
});

test("the device form reads a decimal comma, says when a box holds no number, and goes back to the device", async ({ page }) => {
  await signInAs(page, "admin@halftrip.test");
  await page.goto(`/devices/${fleet.device.id}/edit`);
  const row = page.getByRole("group", { name: "Channel row 2" });
  await expect(row.getByLabel("Index")).toHaveValue("1");
  const maxRange = row.getByLabel("Max range (m)");
  await expect(maxRange).toHaveValue("2.5");

  // Not a number: the message sits beside the box and nothing is saved.
  await maxRange.fill("3,7,5");
  await page.getByRole("button", { name: "Save device" }).click();
  await expect(row.getByText("Type a number, such as 2.5 or 2,5.")).toBeVisible();
  await expect(maxRange).toHaveAttribute("aria-invalid", "true");
  const unchanged = (await admin.get(`/api/devices/${fleet.device.id}`).expect(200)).body.channels;
  expect(unchanged.find((c: { index: number }) => c.index === 1).max_range_m).toBe(2.5);

  // "3,75" is 3.75 m, not 375 m (which the schema would refuse: at most 50 m).
  await maxRange.fill("3,75");
  await page.getByRole("button", { name: "Save device" }).click();
  await expect(page).toHaveURL(new RegExp(`/devices/${fleet.device.id}$`));
  const saved = (await admin.get(`/api/devices/${fleet.device.id}`).expect(200)).body.channels;
  expect(saved.find((c: { index: number }) => c.index === 1).max_range_m).toBeCloseTo(3.75, 9);
  await expect(page.getByRole("region", { name: "Channels" }).getByRole("row", { name: /3\.75/ })).toBeVisible();
});

test("revoking a key asks through the kit's dialog: cancel keeps the key working, confirm stops it", async ({ page }) => {
  expect((await reading(fleet.apiKey, 1)).status).toBe(202);
  await signInAs(page, "admin@halftrip.test");
  await page.goto(`/devices/${fleet.device.id}`);
  const dialog = page.getByRole("dialog", { name: "Revoke this device's key?" });

  await page.getByRole("button", { name: "Revoke key" }).click();
  await expect(dialog).toContainText("Every key of this device stops working at once");
  // Cancel has the focus: a stray Enter does not revoke.
  await expect(dialog.getByRole("button", { name: "Cancel" })).toBeFocused();
  await dialog.getByRole("button", { name: "Cancel" }).click();
  await expect(dialog).toBeHidden();
  expect((await reading(fleet.apiKey, 2)).status).toBe(202);

  await page.getByRole("button", { name: "Revoke key" }).click();
  await page.keyboard.press("Escape");
  await expect(dialog).toBeHidden();
  expect((await reading(fleet.apiKey, 3)).status).toBe(202);

  await page.getByRole("button", { name: "Revoke key" }).click();
  await dialog.getByRole("button", { name: "Revoke key" }).click();
  await expect(dialog).toBeHidden();
  await expect(page.getByRole("status").filter({ hasText: "The key is revoked" })).toBeVisible();
  await expect(page.getByRole("region", { name: "Keys" }).getByRole("row", { name: new RegExp(keyPrefixes[2]) })).not.toContainText("active");
  expect((await reading(fleet.apiKey, 4)).status).toBe(401);
});

test("device health reads its filters from the URL through their schema and clears them", async ({ page }) => {
  await signInAs(page, "viewer@halftrip.test");
  // A state the schema does not know is dropped; a known flag is kept.
  await page.goto(`/health?state=sleeping&flag=drift&q=${fleet.device.serial}`);
  await expect(page.getByLabel("State")).toHaveValue("");
  await expect(page.getByLabel("Sensor flag")).toHaveValue("drift");
  await expect(page.getByLabel("Name or serial")).toHaveValue(fleet.device.serial);
  await expect(page.getByRole("region", { name: "Device health" })).toContainText("No device matches these filters.");

  await page.getByRole("button", { name: "Clear filters" }).click();
  await expect(page).not.toHaveURL(/flag=|q=|state=/);
  await expect(page.getByLabel("Sensor flag")).toHaveValue("");
  await expect(page.getByLabel("Name or serial")).toHaveValue("");
  await expect(page.getByRole("button", { name: "Clear filters" })).toHaveCount(0);
});
