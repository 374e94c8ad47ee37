import request from "supertest";
import { describe, expect, it } from "vitest";
import { sql } from "../support/db";
import { BASE_URL, sessionCookie, signedIn } from "../support/session";

// Issue 14, hole 2: route handlers parsed JSON whatever the Content-Type and checked no Origin, so a
// text/plain form on another port of the same host created a site with the admin's cookie; and no page
// forbade framing.
const siteCount = async (name: string) => Number((await sql<{ n: string }>(`SELECT count(*) AS n FROM sites WHERE name = $1`, [name]))[0].n);

describe("state-changing requests from other origins", () => {
  it("refuses a text/plain form post from another port of the same host, storing nothing", async () => {
    const admin = await signedIn("admin@halftrip.test");
    const name = `Cross-site ${Date.now()}`;
    const otherPort = new URL(BASE_URL);
    otherPort.port = String(Number(otherPort.port) + 7);
    // What a browser sends for <form enctype="text/plain" method="post"> on http://127.0.0.1:<other port>.
    const res = await admin
      .post("/api/sites")
      .set("Origin", otherPort.origin)
      .set("Sec-Fetch-Site", "same-site")
      .set("Content-Type", "text/plain")
      .send(`{"name":"${name}","time_zone":"Europe/Dublin","x":"=1"}`);
    expect(res.status).toBe(403);
    expect(res.body.error).toBe("cross_origin");
    expect(await siteCount(name)).toBe(0);
  });

  it("refuses a same-origin request whose body is not JSON (415) and one with neither Origin nor Sec-Fetch-Site (403)", async () => {
    const admin = await signedIn("admin@halftrip.test");
    const name = `Form body ${Date.now()}`;
    const form = await admin.post("/api/sites").set("Content-Type", "application/x-www-form-urlencoded").send(`name=${encodeURIComponent(name)}&time_zone=UTC`);
    expect(form.status).toBe(415);
    const cookie = await sessionCookie("admin@halftrip.test");
    const bare = await request(BASE_URL).post("/api/sites").set("Cookie", cookie).send({ name, time_zone: "UTC" });
    expect(bare.status).toBe(403);
    expect(await siteCount(name)).toBe(0);
  });

  it("refuses a device-key rotation and an invite from another origin", async () => {
    const admin = await signedIn("admin@halftrip.test");
    const [device] = await sql<{ id: string }>(`SELECT d.id FROM devices d JOIN organisations o ON o.id = d.organisation_id WHERE o.name = 'Brackenmoor Water Cooperative' LIMIT 1`);
    const rotate = await admin.post(`/api/devices/${device.id}/key`).set("Origin", "http://evil.example");
    expect(rotate.status).toBe(403);
    const invite = await admin.post("/api/users").set("Origin", "http://evil.example").send({ email: `x-${Date.now()}@example.org`, role: "admin" });
    expect(invite.status).toBe(403);
  });

  it("accepts the same request from our own origin", async () => {
    const admin = await signedIn("admin@halftrip.test");
    const name = `Same origin ${Date.now()}`;
    expect((await admin.post("/api/sites").send({ name, time_zone: "UTC" })).status).toBe(201);
    expect(await siteCount(name)).toBe(1);
  });
});

describe("security headers", () => {
  it("forbids framing and sniffing on pages, with a nonce-based script policy", async () => {
    const res = await request(BASE_URL).get("/sign-in").expect(200);
    expect(res.headers["x-frame-options"]).toBe("DENY");
    expect(res.headers["x-content-type-options"]).toBe("nosniff");
    expect(res.headers["referrer-policy"]).toBe("strict-origin-when-cross-origin");
    expect(res.headers["permissions-policy"]).toContain("camera=()");
    const csp = res.headers["content-security-policy"] as string;
    expect(csp).toContain("frame-ancestors 'none'");
    const nonce = /'nonce-([^']+)'/.exec(csp)?.[1];
    expect(nonce).toBeTruthy();
    expect(csp).not.toMatch(/script-src[^;]*'unsafe-inline'/);
    // Every script tag of the page carries this response's nonce.
    const scripts = res.text.match(/<script\b[^>]*>/g) ?? [];
    expect(scripts.length).toBeGreaterThan(0);
    for (const tag of scripts) expect(tag).toContain(`nonce="${nonce}"`);
  });

  it("sends a deny-all policy and nosniff on API answers", async () => {
    const res = await request(BASE_URL).get("/api/health");
    expect(res.headers["content-security-policy"]).toContain("default-src 'none'");
    expect(res.headers["content-security-policy"]).toContain("frame-ancestors 'none'");
    expect(res.headers["x-content-type-options"]).toBe("nosniff");
    expect(res.headers["x-frame-options"]).toBe("DENY");
  });
});
