import { describe, expect, it } from "vitest";
import { anonymous, signInAgent, signedIn } from "../support/session";

describe("sessions and roles", () => {
  it("answers 401 JSON on API routes without a session", async () => {
    const res = await anonymous().get("/api/users");
    expect(res.status).toBe(401);
    expect(res.body).toEqual({ error: "unauthorized", message: expect.any(String) });
  });

  it("redirects signed-out page requests to sign-in", async () => {
    const res = await anonymous().get("/users").redirects(0);
    expect([302, 307]).toContain(res.status);
    expect(res.headers.location).toContain("/sign-in");
  });

  it.each(["viewer@halftrip.test", "operator@halftrip.test", "technician@halftrip.test"])("gives %s 403 on the users API", async (email) => {
    const agent = await signedIn(email);
    const list = await agent.get("/api/users");
    expect(list.status).toBe(403);
    expect(list.body.error).toBe("forbidden");
    const invite = await agent.post("/api/users").send({ email: "someone@example.org", role: "viewer" });
    expect(invite.status).toBe(403);
  });

  it("lists users for an admin without any password hash", async () => {
    const agent = await signedIn("admin@halftrip.test");
    const res = await agent.get("/api/users").expect(200);
    expect(res.body.items.map((u: { email: string }) => u.email)).toContain("viewer@halftrip.test");
    expect(JSON.stringify(res.body)).not.toMatch(/password|\$2[aby]\$/);
  });

  it("refuses a wrong password with no session", async () => {
    const { agent, status } = await signInAgent("operator@halftrip.test", "not-the-password");
    expect(status).toBe(401);
    const session = await agent.get("/api/auth/session");
    expect(session.body?.user).toBeUndefined();
  });

  it("answers 429 after 10 failed sign-ins for one e-mail within 15 minutes", async () => {
    const email = `nobody-${Date.now()}@example.org`;
    // From ten addresses, so that no single address is slowed first (documentation range, RFC 5737).
    for (let i = 0; i < 10; i++) expect((await signInAgent(email, "wrong", `192.0.2.${i + 1}`)).status).toBe(401);
    const { status } = await signInAgent(email, "wrong", "192.0.2.11");
    expect(status).toBe(429);
  });

  it("reports health with the database up", async () => {
    const res = await anonymous().get("/api/health").expect(200);
    expect(res.body).toEqual({ ok: true, db: "up" });
  });
});
