import { describe, expect, it } from "vitest";
import { anonymous, signInAgent, signedIn } from "../support/session";
import { firstLink, waitForMail } from "../support/mail-sink";

describe("inviting a user", () => {
  it("e-mails a single-use link that sets a password, after which the new user signs in", async () => {
    const admin = await signedIn("admin@halftrip.test");
    const email = `new-tech-${Date.now()}@example.org`;
    const created = await admin.post("/api/users").send({ email, name: "New Tech", role: "technician" });
    expect(created.status).toBe(201);
    expect(created.body.user).toMatchObject({ email, role: "technician", status: "invited" });

    const mail = await waitForMail(email);
    const link = firstLink(mail.text, "/invite/");
    const token = decodeURIComponent(new URL(link).pathname.split("/invite/")[1]);

    const page = await anonymous().get(`/invite/${encodeURIComponent(token)}`);
    expect(page.text).toContain("Set your password");

    const first = await anonymous().post("/api/invites/accept").send({ token, password: "a-long-password-1", confirm: "a-long-password-1" });
    expect(first.status).toBe(200);
    const second = await anonymous().post("/api/invites/accept").send({ token, password: "another-password-2", confirm: "another-password-2" });
    expect(second.status).toBe(410);
    expect(second.body.error).toBe("invite_used");
    const reused = await anonymous().get(`/invite/${encodeURIComponent(token)}`);
    expect(reused.text).toContain("already used");

    const { status } = await signInAgent(email, "a-long-password-1");
    expect(status).toBe(200);
    const again = await signInAgent(email, "another-password-2");
    expect(again.status).toBe(401);
  });

  it("refuses a tampered invite token and changes nothing", async () => {
    const res = await anonymous().post("/api/invites/accept").send({ token: "00000000-0000-0000-0000-000000000000.9999999999.forged", password: "a-long-password-1", confirm: "a-long-password-1" });
    expect(res.status).toBe(410);
    expect(res.body.error).toBe("invite_bad_signature");
  });

  it("validates the invite with a message per field", async () => {
    const admin = await signedIn("admin@halftrip.test");
    const res = await admin.post("/api/users").send({ email: "not-an-email", role: "boss" });
    expect(res.status).toBe(422);
    expect(res.body.fields.email).toMatch(/e-mail/);
    expect(res.body.fields.role).toMatch(/role/);
  });

  it("refuses a deactivated user's next request and writes audit rows", async () => {
    const admin = await signedIn("admin@halftrip.test");
    const email = `leaver-${Date.now()}@example.org`;
    await admin.post("/api/users").send({ email, role: "operator" }).expect(201);
    const token = decodeURIComponent(new URL(firstLink((await waitForMail(email)).text, "/invite/")).pathname.split("/invite/")[1]);
    await anonymous().post("/api/invites/accept").send({ token, password: "leaver-password-1", confirm: "leaver-password-1" }).expect(200);
    const { agent } = await signInAgent(email, "leaver-password-1");
    expect((await agent.get("/api/auth/session")).body.user.email).toBe(email);

    const list = await admin.get("/api/users").expect(200);
    const id = list.body.items.find((u: { email: string }) => u.email === email).id;
    await admin.patch(`/api/users/${id}`).send({ role: "viewer" }).expect(200);
    await admin.patch(`/api/users/${id}`).send({ status: "deactivated" }).expect(200);
    const users = await agent.get("/api/users");
    expect(users.status).toBe(401);

    const audit = await admin.get("/api/audit?entity_id=" + id).expect(200);
    expect(audit.body.items.map((a: { action: string }) => a.action)).toEqual(expect.arrayContaining(["user.invite", "user.update", "user.accept_invite"]));
  });

  it("answers 404 for a user id of no one in the organisation", async () => {
    const admin = await signedIn("admin@halftrip.test");
    const res = await admin.patch("/api/users/7d0e3b0e-1111-4e4e-9999-123456789abc").send({ role: "viewer" });
    expect(res.status).toBe(404);
  });
});
