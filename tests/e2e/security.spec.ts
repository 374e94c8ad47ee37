import http from "node:http";
import type { AddressInfo } from "node:net";
import { expect, test, type Page } from "@playwright/test";
import pg from "pg";
import { signInAs } from "../support/browser";

// Issue 14, holes 2 and 3 in a real browser: an open redirect after sign-in, a form posted to the API
// from a page on another port of the same host, and pages that must run under their own CSP.

async function count(text: string, params: unknown[]): Promise<number> {
  const client = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await client.connect();
  try {
    return Number((await client.query(text, params)).rows[0].n);
  } finally {
    await client.end();
  }
}

function collectCspViolations(page: Page): string[] {
  const found: string[] = [];
  page.on("console", (m) => {
    if (/Content Security Policy|Refused to (load|execute|apply|connect|frame)/i.test(m.text())) found.push(m.text());
  });
  return found;
}

test("sign-in never sends the browser to another host", async ({ page, baseURL }) => {
  for (const callback of ["/%5Cevil.example/x", "/%09/evil.example/x", "//evil.example/x", "https://evil.example/x"]) {
    await page.context().clearCookies();
    await page.goto(`/sign-in?callbackUrl=${callback}`);
    await page.getByLabel("E-mail").fill("viewer@halftrip.test");
    await page.getByLabel("Password").fill("demo-tanks-and-bays");
    await page.getByRole("button", { name: "Sign in" }).click();
    await expect(page.getByRole("heading", { name: "Overview" })).toBeVisible({ timeout: 30_000 });
    expect(new URL(page.url()).origin).toBe(new URL(baseURL!).origin);
  }
});

test("a form posted from a page on another port does not create a site with the admin's cookie", async ({ page, baseURL }) => {
  await signInAs(page, "admin@halftrip.test");
  const name = `Form from elsewhere ${Date.now()}`;
  const target = new URL("/api/sites", baseURL).href;
  // A text/plain form whose one field forms valid JSON: the classic way to post "JSON" cross-site.
  const attacker = http.createServer((_req, res) => {
    res.writeHead(200, { "content-type": "text/html" });
    res.end(`<!doctype html><form id="f" method="post" action="${target}" enctype="text/plain">
      <input type="hidden" name='{"name":"${name}","time_zone":"UTC","x":"' value='"}'></form>
      <script>document.getElementById("f").submit()</script>`);
  });
  await new Promise<void>((resolve) => attacker.listen(0, "127.0.0.1", resolve));
  try {
    const port = (attacker.address() as AddressInfo).port;
    const answer = page.waitForResponse((r) => r.url() === target);
    await page.goto(`http://127.0.0.1:${port}/`);
    expect((await answer).status()).toBe(403);
    await expect(page.locator("body")).toContainText("cross_origin");
  } finally {
    attacker.close();
  }
  expect(await count(`SELECT count(*) AS n FROM sites WHERE name = $1`, [name])).toBe(0);
});

test("no page of the app breaks its own Content-Security-Policy", async ({ page }) => {
  test.setTimeout(180_000);
  const violations = collectCspViolations(page);
  await page.goto("/sign-in");
  await signInAs(page, "admin@halftrip.test");
  const paths = ["/", "/alarms", "/alarm-health", "/health", "/refill-plan", "/calibration", "/imports", "/exports", "/sites", "/assets", "/devices", "/device-api", "/users", "/audit", "/mail"];
  for (const path of paths) {
    const res = await page.goto(path);
    expect(res?.headers()["content-security-policy"]).toContain("frame-ancestors 'none'");
    await expect(page.locator("h1").first()).toBeVisible({ timeout: 30_000 });
    await page.waitForTimeout(500);
  }
  // A page with a chart: the first tank's page.
  await page.goto("/assets");
  const firstAsset = page.locator('a[href^="/assets/"]').filter({ hasNotText: "New" }).first();
  if (await firstAsset.count()) {
    await firstAsset.click();
    await expect(page.locator("h1").first()).toBeVisible({ timeout: 30_000 });
    await page.waitForTimeout(1500);
  }
  expect(violations).toEqual([]);
});
