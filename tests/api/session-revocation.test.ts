import bcrypt from "bcryptjs";
import request from "supertest";
import { describe, expect, it } from "vitest";
import { createOtherOrganisation, sql } from "../support/db";
import { BASE_URL, sessionCookie, signedIn } from "../support/session";

// Issue 14, hole 7: a session token (a 12 h JWT) kept working after sign-out, and reactivating a user
// revived tokens issued before the deactivation. Each of these raises users.session_version, which the
// token carries and every request compares.
const withCookie = (cookie: string) => request(BASE_URL).get("/api/overview").set("Cookie", cookie);

async function memberOf(organisationId: string, role = "operator") {
  const email = `member-${Date.now()}-${Math.random().toString(36).slice(2, 6)}@example.org`;
  const password = "member-password-for-tests";
  const [row] = await sql<{ id: string }>(
    `INSERT INTO users (organisation_id, email, name, role, status, password_hash) VALUES ($1, $2, 'Member', $3, 'active', $4) RETURNING id`,
    [organisationId, email, role, await bcrypt.hash(password, 4)],
  );
  return { id: row.id, email, password };
}

describe("revocable sessions", () => {
  it("ends a copied session token when its user signs out", async () => {
    const org = await createOtherOrganisation();
    const member = await memberOf(org.organisationId);
    const copied = await sessionCookie(member.email, member.password);
    expect((await withCookie(copied)).status).toBe(200);

    const csrf = await request(BASE_URL).get("/api/auth/csrf");
    const csrfCookie = ([] as string[]).concat(csrf.headers["set-cookie"] ?? []).map((c) => c.split(";")[0]).join("; ");
    await request(BASE_URL)
      .post("/api/auth/signout")
      .set("Cookie", `${copied}; ${csrfCookie}`)
      .set("Origin", new URL(BASE_URL).origin)
      .type("form")
      .send({ csrfToken: csrf.body.csrfToken, json: "true" });

    expect((await withCookie(copied)).status).toBe(401);
  });

  it("ends old sessions on deactivation for good: reactivating does not revive them", async () => {
    const org = await createOtherOrganisation();
    const admin = await signedIn(org.adminEmail, org.password);
    const member = await memberOf(org.organisationId);
    const copied = await sessionCookie(member.email, member.password);
    expect((await withCookie(copied)).status).toBe(200);
    await admin.patch(`/api/users/${member.id}`).send({ status: "deactivated" }).expect(200);
    expect((await withCookie(copied)).status).toBe(401);
    await admin.patch(`/api/users/${member.id}`).send({ status: "active" }).expect(200);
    expect((await withCookie(copied)).status).toBe(401);
    // A fresh sign-in works again.
    expect((await withCookie(await sessionCookie(member.email, member.password))).status).toBe(200);
  });

  it("ends old sessions on a role change and on a new password", async () => {
    const org = await createOtherOrganisation();
    const admin = await signedIn(org.adminEmail, org.password);
    const member = await memberOf(org.organisationId);
    const beforeRole = await sessionCookie(member.email, member.password);
    await admin.patch(`/api/users/${member.id}`).send({ role: "viewer" }).expect(200);
    expect((await withCookie(beforeRole)).status).toBe(401);

    const beforePassword = await sessionCookie(member.email, member.password);
    expect((await withCookie(beforePassword)).status).toBe(200);
    await sql(`UPDATE users SET password_hash = $2 WHERE id = $1`, [member.id, await bcrypt.hash("a-new-password-entirely", 4)]);
    expect((await withCookie(beforePassword)).status).toBe(401);
  });
});
