import { expect, test } from "@playwright/test";
import { signInAs } from "../support/browser";
import { anonymous, signedIn } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { firstLink, waitForMail } from "../support/mail-sink";

// The admin screens that had no browser test: an invite followed from the e-mail to a first sign-in,
// the audit log that records it, device health, and a key rotation that shows the new key once and
// stops the old one at once.

let fleet: Awaited<ReturnType<typeof createTankWithDevice>>;

test.beforeAll(async () => {
  fleet = await createTankWithDevice(await signedIn("admin@halftrip.test"), { device: { expected_interval_s: 600 } });
});

const reading = (key: string, seq: number) =>
  // Round-trip echo of 1.2 m at 20 °C (t = 2·d/c, c = 343.2 m/s, REFERENCES.md §2).
  anonymous().post("/api/v1/readings").set("Authorization", `Bearer ${key}`).send({ readings: [{ seq, channel: 0, echo_us: 6992.7, air_temp_c: 20 }] });

test("an invite goes out by e-mail, the link sets a password once, and the new person signs in; the audit log records it", async ({ page, browser }) => {
  const email = `invitee-${Date.now()}@halftrip.test`;
  const password = "gravel-lantern-tide-0417";
  await signInAs(page, "admin@halftrip.test");
  await page.goto("/users");
  const invite = page.getByRole("form", { name: "Invite someone" });
  await invite.getByLabel("E-mail").fill(email);
  await invite.getByLabel("Name").fill("Ivy Invitee");
  await invite.getByLabel("Role", { exact: true }).selectOption("technician");
  await invite.getByRole("button", { name: "Send invite" }).click();
  await expect(page.getByRole("status").filter({ hasText: `Invite sent to ${email}` })).toBeVisible({ timeout: 30_000 });
  await expect(page.getByRole("region", { name: "People" }).getByRole("row", { name: new RegExp(email) })).toBeVisible();

  const mail = await waitForMail(email);
  const link = firstLink(mail.text, "/invite/");
  // The invitee opens the link in a browser of their own, not signed in.
  const invitee = await (await browser.newContext()).newPage();
  await invitee.goto(link);
  await expect(invitee.getByRole("heading", { name: "Set your password" })).toBeVisible();
  await expect(invitee.getByText(`For ${email}`)).toBeVisible();
  await invitee.getByLabel("New password").fill(password);
  await invitee.getByLabel("Repeat it").fill(`${password}x`);
  await invitee.getByRole("button", { name: "Set password" }).click();
  await expect(invitee.getByText("The two passwords differ.")).toBeVisible();
  await invitee.getByLabel("Repeat it").fill(password);
  await invitee.getByRole("button", { name: "Set password" }).click();
  await expect(invitee.getByRole("status")).toContainText("Your password is set", { timeout: 30_000 });
  await invitee.getByRole("link", { name: "Sign in" }).click();
  await signInAs(invitee, email, password);
  await expect(invitee.getByRole("navigation", { name: "Main" })).toBeVisible();
  // The link works once.
  await invitee.goto(link);
  await expect(invitee.getByRole("heading", { name: "This link cannot be used" })).toBeVisible();
  await invitee.context().close();

  await page.goto("/audit");
  const log = page.getByRole("region", { name: "Audit log" });
  const row = log.getByRole("row").filter({ hasText: "user.invite" }).filter({ hasText: email });
  await expect(row).toHaveCount(1);
  await expect(row).toContainText("admin@halftrip.test");
});

test("device health finds a device by serial and says when it was last heard", async ({ page }) => {
  expect((await reading(fleet.apiKey, 1)).status).toBe(202);
  await signInAs(page, "viewer@halftrip.test");
  await page.goto("/health");
  await page.getByLabel("Name or serial").fill(fleet.device.serial);
  await page.getByRole("button", { name: "Search" }).click();
  await expect(page).toHaveURL(new RegExp(`q=${fleet.device.serial}`));
  const rows = page.getByTestId("device-health-row");
  await expect(rows).toHaveCount(1);
  await expect(rows.first()).toContainText(fleet.site.name);
  await expect(rows.first()).not.toContainText("never");
  await expect(rows.first()).not.toContainText("offline");
  await expect(rows.first().getByRole("link", { name: fleet.tank.name })).toBeVisible();
  await page.getByRole("button", { name: "Clear filters" }).click();
  await expect(page).not.toHaveURL(/q=/);
  await rows.first().waitFor();
  await page.getByLabel("Name or serial").fill(fleet.device.serial);
  await page.getByRole("button", { name: "Search" }).click();
  await rows.first().getByRole("link", { name: fleet.device.name }).click();
  await expect(page.getByRole("heading", { level: 1, name: fleet.device.name })).toBeVisible();
});

test("rotating a device's key shows the new key once, refuses the old one and accepts the new", async ({ page }) => {
  const old = fleet.apiKey;
  expect((await reading(old, 2)).status).toBe(202);
  await signInAs(page, "admin@halftrip.test");
  await page.goto(`/devices/${fleet.device.id}`);
  const keys = page.getByRole("region", { name: "Keys" });
  await expect(keys).toContainText(old.slice(0, 15));

  await page.getByRole("button", { name: "Rotate key" }).click();
  const dialog = page.getByRole("dialog", { name: "Rotate this device's key?" });
  await expect(dialog).toContainText("The current key stops working at once");
  await dialog.getByRole("button", { name: "Rotate key" }).click();
  await expect(dialog).toBeHidden({ timeout: 30_000 });
  const shown = page.getByRole("region", { name: "The new key" });
  await expect(shown).toContainText("You will not see it again");
  const fresh = ((await shown.getByTestId("device-api-key").textContent()) ?? "").trim();
  expect(fresh).toMatch(/^ht_[0-9a-f]{12}_[A-Za-z0-9_-]{43}$/);
  expect(fresh).not.toBe(old);
  await expect(keys).toContainText(fresh.slice(0, 15));

  const refused = await reading(old, 3);
  expect(refused.status).toBe(401);
  expect((await reading(fresh, 4)).status).toBe(202);

  // Shown once: after a reload only its prefix is left.
  await page.reload();
  await expect(page.getByRole("heading", { level: 1, name: fleet.device.name })).toBeVisible();
  await expect(page.getByRole("region", { name: "The new key" })).toHaveCount(0);
  await expect(page.getByText(fresh)).toHaveCount(0);
});
