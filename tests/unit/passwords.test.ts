import bcrypt from "bcryptjs";
import { createHash } from "node:crypto";
import { describe, expect, it } from "vitest";
import { passwordProblem } from "@/lib/auth/password-list";
import { hashPassword, verifyPassword } from "@/lib/auth/passwords";
import { DEMO_PASSWORD } from "@/db/seeds/demo-accounts";

// Issue 14, hole 8: ten characters were enough ("aaaaaaaaaa" was accepted) and bcrypt ignored every byte
// past the 72nd. Rules from NIST SP 800-63B Rev. 4, section 3.1.1.2 (a password that is the only factor).
describe("password rules (NIST SP 800-63B Rev. 4)", () => {
  it("needs at least 15 characters, counted as code points", () => {
    expect(passwordProblem("aaaaaaaaaa")).toMatch(/15 characters/);
    expect(passwordProblem("fourteen-chars")).toMatch(/15 characters/);
    expect(passwordProblem("fifteen-chars-x")).toBeNull();
    // 15 emoji are 30 UTF-16 units but 15 characters: accepted; 14 are not.
    expect(passwordProblem("🐟🐠🐡🦈🐙🦑🦀🦞🦐🐚🪸🐬🐳🐋🦭")).toBeNull();
    expect(passwordProblem("🐟🐠🐡🦈🐙🦑🦀🦞🐚🪸🐬🐳🐋🦭")).toMatch(/15 characters/);
  });

  it("asks for no mix of character classes (no composition rules)", () => {
    expect(passwordProblem("correct horse battery staple")).toBeNull();
    expect(passwordProblem("lowercase only words here")).toBeNull();
  });

  it("refuses passwords on the shipped list of common and breached passwords", () => {
    // Both are keyboard walks found in the shipped list (@zxcvbn-ts/language-common, passwords-common).
    expect(passwordProblem("1qaz2wsx3edc4rfv")).toMatch(/common or breached/);
    expect(passwordProblem("123456789qwerty")).toMatch(/common or breached/);
  });

  it("refuses repeated or running patterns and the service's name", () => {
    expect(passwordProblem("aaaaaaaaaaaaaaaa")).toMatch(/repeats/);
    expect(passwordProblem("abcdefghijklmnop")).toMatch(/repeats/);
    expect(passwordProblem("passwordpassword")).toMatch(/repeats|common/);
    expect(passwordProblem("my-halftrip-password")).toMatch(/name of the service/);
  });

  it("accepts the demo accounts' password", () => {
    expect(passwordProblem(DEMO_PASSWORD)).toBeNull();
  });
});

describe("password hashes", () => {
  it("tells apart passwords that differ only after byte 72 (bcrypt alone would not)", async () => {
    const a = `${"x".repeat(80)}A`;
    const b = `${"x".repeat(80)}B`;
    // The flaw being fixed, shown with bcrypt itself: it reads only the first 72 bytes.
    expect(await bcrypt.compare(b, await bcrypt.hash(a, 4))).toBe(true);
    const stored = await hashPassword(a);
    expect(await verifyPassword(a, stored)).toBe(true);
    expect(await verifyPassword(b, stored)).toBe(false);
  });

  it("marks the scheme in the stored hash and still accepts plain bcrypt hashes stored before", async () => {
    expect(await hashPassword("fifteen-chars-x")).toMatch(/^\$ht1\$\$2[aby]\$10\$/);
    const legacy = await bcrypt.hash("an-older-password", 4);
    expect(await verifyPassword("an-older-password", legacy)).toBe(true);
    expect(await verifyPassword("an-older-passwore", legacy)).toBe(false);
  });

  it("does not store a plain SHA-256 of the password under bcrypt (keyed pre-hash)", async () => {
    const plainSha = createHash("sha256").update("fifteen-chars-x").digest("base64");
    const stored = await hashPassword("fifteen-chars-x");
    expect(await bcrypt.compare(plainSha, stored.slice("$ht1$".length))).toBe(false);
  });
});
