import { describe, expect, it } from "vitest";
import { firstLink, waitForMail } from "../support/mail-sink";
import { anonymous, signInAgent, signedIn } from "../support/session";

// Issue 14, hole 8: "aaaaaaaaaa" was accepted as a password, and bcrypt ignored every byte past the 72nd.
describe("setting a password from an invite", () => {
  it("refuses short, listed and patterned passwords, and keeps every character of a long one", async () => {
    const admin = await signedIn("admin@halftrip.test");
    const email = `pw-${Date.now()}@example.org`;
    expect((await admin.post("/api/users").send({ email, name: "Pw Test", role: "viewer" })).status).toBe(201);
    const token = decodeURIComponent(new URL(firstLink((await waitForMail(email)).text, "/invite/")).pathname.split("/invite/")[1]);

    for (const bad of ["aaaaaaaaaa", "fourteen-chars", "1qaz2wsx3edc4rfv", "aaaaaaaaaaaaaaaaaaaa"]) {
      const res = await anonymous().post("/api/invites/accept").send({ token, password: bad, confirm: bad });
      expect(res.status).toBe(422);
      expect(res.body.fields).toHaveProperty("password");
    }

    const long = `${"a sentence that goes on and on ".repeat(3)}ending-1`;
    expect(Buffer.byteLength(long)).toBeGreaterThan(72);
    expect((await anonymous().post("/api/invites/accept").send({ token, password: long, confirm: long })).status).toBe(200);
    expect((await signInAgent(email, long)).status).toBe(200);
    expect((await signInAgent(email, long.replace(/1$/, "2"), "192.0.2.250")).status).toBe(401);
  });
});
