import { describe, expect, it } from "vitest";
import { createOtherOrganisation } from "../support/db";
import { signInAgent } from "../support/session";

// Issue 14, hole 4: throttling was per e-mail only (anyone could lock any account out), thirty
// simultaneous wrong passwords were all counted past the limit of ten, and nothing slowed one address
// spraying one password over many accounts. Limits: lib/auth/sign-in-throttle.ts (10 an account in
// 15 min; 5 free attempts an address, then growing delays). Addresses are from RFC 5737's documentation
// ranges, one block per test, sent as X-Forwarded-For (the test server has no proxy in front).
const run = Date.now() % 200;

describe("sign-in throttling", () => {
  it("checks at most 10 of 30 simultaneous wrong passwords for one account, from 30 addresses", async () => {
    const email = `throttle-${Date.now()}@example.org`;
    const results = await Promise.all(Array.from({ length: 30 }, (_, i) => signInAgent(email, "wrong-password-guess", `198.51.100.${i + 1}`)));
    const statuses = results.map((r) => r.status);
    expect(statuses.filter((s) => s === 401)).toHaveLength(10);
    expect(statuses.filter((s) => s === 429)).toHaveLength(20);
  });

  it("slows one address spraying one password over 30 accounts: 5 free attempts, then one a growing delay", async () => {
    const address = `203.0.113.${run + 1}`;
    const started = Date.now();
    const results = await Promise.all(Array.from({ length: 30 }, (_, i) => signInAgent(`spray-${i}-${Date.now()}@example.org`, "Summer2026!Summer", address)));
    const burstS = (Date.now() - started) / 1000;
    const checked = results.filter((r) => r.status === 401).length;
    // The 5 free ones, plus one more each time the delay (1 s, 2 s, 4 s …) ran out while the burst lasted:
    // delays summing 2^k − 1 s fit k extra attempts into a burst of that length (more under a slow machine).
    expect(checked).toBeGreaterThanOrEqual(5);
    expect(checked).toBeLessThanOrEqual(5 + Math.ceil(Math.log2(burstS + 1)) + 1);
    expect(results.filter((r) => r.status === 429)).toHaveLength(30 - checked);
    // Right after the burst the address waits: of three attempts in a row at most one is checked.
    const after: number[] = [];
    for (let i = 0; i < 3; i++) after.push((await signInAgent(`spray-after-${i}-${Date.now()}@example.org`, "Summer2026!Summer", address)).status);
    expect(after.filter((s) => s === 429).length).toBeGreaterThanOrEqual(2);
  });

  it("does not let a stranger lock the owner out: the owner's known address still signs in", async () => {
    const owner = await createOtherOrganisation();
    const home = `192.0.2.${200 + (run % 50)}`;
    expect((await signInAgent(owner.adminEmail, owner.password, home)).status).toBe(200);
    for (let i = 0; i < 10; i++) expect((await signInAgent(owner.adminEmail, "a-wrong-guess", `198.18.${run}.${i + 1}`)).status).toBe(401);
    expect((await signInAgent(owner.adminEmail, owner.password, `198.18.${run}.99`)).status).toBe(429);
    expect((await signInAgent(owner.adminEmail, owner.password, home)).status).toBe(200);
  });
});
