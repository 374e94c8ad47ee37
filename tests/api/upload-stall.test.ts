import http from "node:http";
import { describe, expect, it } from "vitest";
import { createTankWithDevice } from "../support/fleet";
import { sql } from "../support/db";
import { anonymous, BASE_URL, sessionCookie, signedIn } from "../support/session";

// Issue 14, hole 5: PUT /api/imports/{id}/file that sent 17 of 1 000 declared bytes kept a connection
// "idle in transaction" for as long as the client waited; and the public routes read bodies of any size.
const idleInTransaction = async () =>
  Number((await sql<{ n: string }>(`SELECT count(*) AS n FROM pg_stat_activity WHERE datname = current_database() AND state LIKE 'idle in transaction%'`))[0].n);

describe("uploads and body limits", () => {
  it("holds no transaction while an upload's body is still arriving", async () => {
    const admin = await signedIn("admin@halftrip.test");
    const fleet = await createTankWithDevice(admin);
    const created = await admin.post("/api/imports").send({ kind: "dips", target_id: fleet.tank.id, file_name: "stalled.csv", size_bytes: 1000 });
    expect(created.status).toBe(201);
    const cookie = await sessionCookie("admin@halftrip.test");
    const url = new URL(`/api/imports/${created.body.id}/file`, BASE_URL);
    const req = http.request(url, {
      method: "PUT",
      headers: { Cookie: cookie, Origin: url.origin, "Content-Type": "text/csv", "Content-Length": "1000" },
    });
    req.on("error", () => undefined);
    req.write("at,level_m\n2026-0"); // 17 bytes, then nothing
    try {
      await new Promise((r) => setTimeout(r, 2500));
      expect(await idleInTransaction()).toBe(0);
    } finally {
      req.destroy();
    }
  });

  it.each([
    ["/api/invites/accept", { token: "x".repeat(10), password: "p", confirm: "p" }],
    ["/api/alarms/ack-link", { token: "x".repeat(10) }],
  ])("refuses a 30 KB body on the public route %s with 413", async (path, body) => {
    const res = await anonymous().post(path).send({ ...body, padding: "x".repeat(30_000) });
    expect(res.status).toBe(413);
  });

  it("refuses a 30 KB body on the credentials callback with 413", async () => {
    const res = await anonymous().post("/api/auth/callback/credentials").type("form").send({ email: "a@example.org", password: "x".repeat(30_000) });
    expect(res.status).toBe(413);
  });

  it("refuses a 2 MB JSON body on a management route with 413", async () => {
    const admin = await signedIn("admin@halftrip.test");
    const res = await admin.post("/api/sites").send({ name: "x".repeat(2_000_000), time_zone: "UTC" });
    expect(res.status).toBe(413);
  });
});
