import { execFile } from "node:child_process";
import { promisify } from "node:util";
import { expect, test } from "@playwright/test";
import { signInAs } from "../support/browser";
import { anonymous, signedIn } from "../support/session";
import { createTankWithDevice } from "../support/fleet";

// The screens kit in use: the alarm table sorts from its headers (through the API's ?sort=), and a
// role change asks first and can be undone.

const run = promisify(execFile);
// Speed of sound in dry air at 20 °C (REFERENCES.md §1), for echo times of a known level.
const C_20 = 343.215;

test.beforeAll(async () => {
  test.setTimeout(180_000);
  const admin = await signedIn("admin@halftrip.test");
  // Two sites, each with a tank over its H setpoint, so the alarm list has rows from more than one site.
  for (let i = 0; i < 2; i++) {
    const fleet = await createTankWithDevice(admin);
    await admin.put(`/api/assets/${fleet.tank.id}/setpoints`).send({ setpoints: { h: { value: 1.5, on_delay_s: 0 } } }).expect(200);
    // Level 2.0 m under a sensor 3 m up: echo t = 2·(3 − 2.0)/c (REFERENCES.md §2).
    const echo = Math.round(((2 * (3 - 2.0)) / C_20) * 1e7) / 10;
    const start = Date.now() - 6 * 60_000;
    const readings = Array.from({ length: 6 }, (_, k) => ({ seq: k + 1, at: new Date(start + k * 60_000).toISOString(), channel: 0, echo_us: echo, air_temp_c: 20 }));
    const res = await anonymous().post("/api/v1/readings").set("Authorization", `Bearer ${fleet.apiKey}`).send({ readings });
    expect(res.status).toBe(202);
  }
  await run("npx", ["tsx", "workers/worker.ts", "--once"], { env: { ...process.env, WORKER_QUIET: "1" }, timeout: 120_000 });
});

test("the alarm table sorts from its headers, with aria-sort, and keeps the sort in the URL", async ({ page }) => {
  const operator = await signedIn("operator@halftrip.test");
  await signInAs(page, "operator@halftrip.test");
  await page.goto("/alarms?state=all");
  const table = page.getByRole("region", { name: "Alarms" });
  const siteHeader = table.getByRole("columnheader", { name: /Site/ });
  await expect(siteHeader).toHaveAttribute("aria-sort", "none");
  await expect(table.getByRole("columnheader", { name: /Priority/ })).toHaveAttribute("aria-sort", "ascending");

  const shownSites = async () => (await table.locator("tbody tr td[data-label='Site']").allTextContents()).map((t) => t.trim());
  const apiSites = async (sort: string) =>
    ((await operator.get(`/api/alarms?sort=${sort}&page_size=50`).expect(200)).body.items as { site: { name: string } }[]).map((a) => a.site.name);

  await siteHeader.getByRole("button").click();
  await expect(page).toHaveURL(/sort=site(&|$)/);
  await expect(siteHeader).toHaveAttribute("aria-sort", "ascending");
  await expect.poll(shownSites).toEqual(await apiSites("site"));

  await siteHeader.getByRole("button").click();
  await expect(page).toHaveURL(/sort=-site/);
  await expect(siteHeader).toHaveAttribute("aria-sort", "descending");
  const descending = await apiSites("-site");
  await expect.poll(shownSites).toEqual(descending);
  expect(new Set(descending).size).toBeGreaterThan(1);

  // The sort survives a reload; clearing the filters keeps it.
  await page.reload();
  await expect(siteHeader).toHaveAttribute("aria-sort", "descending");
  await page.getByRole("button", { name: "Clear filters" }).click();
  await expect(page).not.toHaveURL(/state=/);
  await expect(page).toHaveURL(/sort=-site/);
});

test("a role change asks first, says what the role may do, and can be undone", async ({ page }) => {
  const admin = await signedIn("admin@halftrip.test");
  const email = `kit-${Date.now()}@halftrip.test`;
  const roleOf = async () => ((await admin.get("/api/users").expect(200)).body.items as { email: string; role: string }[]).find((u) => u.email === email)?.role;
  await signInAs(page, "admin@halftrip.test");
  await page.goto("/users");

  // The invite form checks the shared schema before sending.
  await page.getByLabel("E-mail").fill("not-an-address");
  await page.getByRole("button", { name: "Send invite" }).click();
  await expect(page.getByText("Enter a valid e-mail address")).toBeVisible();
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Role", { exact: true }).selectOption("viewer");
  await page.getByRole("button", { name: "Send invite" }).click();
  await expect(page.getByRole("status").filter({ hasText: `Invite sent to ${email}` })).toBeVisible();
  await expect.poll(roleOf).toBe("viewer");

  const role = page.getByLabel(`Role of ${email}`);
  // Picking a role only asks; Cancel leaves everything as it was.
  await role.selectOption("technician");
  const dialog = page.getByRole("dialog", { name: `Make ${email} a technician?` });
  await expect(dialog).toContainText("record manual dips");
  await dialog.getByRole("button", { name: "Cancel" }).click();
  await expect(dialog).toHaveCount(0);
  await expect(role).toHaveValue("viewer");
  expect(await roleOf()).toBe("viewer");

  // Confirmed, it is saved; Undo puts the old role back.
  await role.selectOption("technician");
  await page.getByRole("dialog").getByRole("button", { name: "Change role to technician" }).click();
  const toast = page.getByRole("status").filter({ hasText: `${email} is now technician` });
  await expect(toast).toBeVisible();
  await expect.poll(roleOf).toBe("technician");
  await toast.getByRole("button", { name: "Undo" }).click();
  await expect.poll(roleOf).toBe("viewer");
  await expect(role).toHaveValue("viewer");
});
