import bcrypt from "bcryptjs";
import { expect, test } from "@playwright/test";
import { signedIn } from "../support/session";
import { signInAs } from "../support/browser";
import { createTankWithDevice } from "../support/fleet";
import { sql } from "../support/db";

// Partner scope in the browser (docs/security.md): an admin limits a delivery partner to one site on
// the users page; on a phone the partner's overview shows that site only, and the other site's page
// is not found.

test("an admin limits a partner to one site; on a 390 px phone the partner sees only that site", async ({ page, browser }) => {
  test.setTimeout(120_000);
  const admin = await signedIn("admin@halftrip.test");
  const [mine, other] = [await createTankWithDevice(admin), await createTankWithDevice(admin)];
  const email = `partner-${Date.now()}@example.org`;
  const name = `Partner ${Date.now()}`;
  const [org] = await sql<{ organisation_id: string }>(`SELECT organisation_id FROM users WHERE email = 'admin@halftrip.test'`);
  await sql(`INSERT INTO users (organisation_id, email, name, role, status, password_hash) VALUES ($1, $2, $3, 'viewer', 'active', $4)`, [
    org.organisation_id,
    email,
    name,
    await bcrypt.hash("partner-password-1", 4),
  ]);

  await signInAs(page, "admin@halftrip.test");
  await page.goto("/users");
  const card = page.getByRole("group", { name: new RegExp(name) });
  await card.getByLabel("Only these sites").check();
  await card.getByLabel(mine.site.name).check();
  await card.getByRole("button", { name: /Save sites/ }).click();
  await expect(card.getByRole("status")).toHaveText("Limited to 1 site.");

  const phone = await browser.newContext({ viewport: { width: 390, height: 844 }, baseURL: test.info().project.use.baseURL });
  const partner = await phone.newPage();
  await signInAs(partner, email, "partner-password-1");
  await expect(partner.getByRole("link", { name: mine.site.name })).toBeVisible();
  await expect(partner.getByText(other.site.name)).toHaveCount(0);
  const width = await partner.evaluate(() => document.documentElement.scrollWidth);
  expect(width).toBeLessThanOrEqual(390);
  await partner.goto(`/sites/${other.site.id}`);
  await expect(partner.getByRole("heading", { name: "Not found" })).toBeVisible();
  await partner.goto(`/assets/${mine.tank.id}`);
  await expect(partner.getByRole("main")).toContainText(mine.tank.name);
  await phone.close();
});
