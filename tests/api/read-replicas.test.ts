import { execFile } from "node:child_process";
import { promisify } from "node:util";
import { beforeAll, describe, expect, it } from "vitest";
import { signedIn } from "../support/session";
import { createDevice, createSite } from "./worker-support";

// Sequelize's `replication` turned on by DATABASE_REPLICA_URLS, against the test database twice:
// the primary as "halftrip_primary", the read pool as "halftrip_replica" and read-only (as a streaming
// replica is), so a write sent to the read pool fails instead of passing unnoticed.
const run = promisify(execFile);

function withSession(url: string, name: string, readOnly = false): string {
  const u = new URL(url);
  u.searchParams.set("application_name", name);
  if (readOnly) u.searchParams.set("options", "-c default_transaction_read_only=on");
  return u.toString();
}

type Probe = { pools: string[]; answer?: unknown; error?: string };
let probes: Record<string, Probe>;

beforeAll(async () => {
  const admin = await signedIn("admin@halftrip.test");
  const site = await createSite(admin);
  const device = await createDevice(admin, site.id, { channels: [{ index: 0 }] });
  const base = process.env.DATABASE_URL!;
  const { stdout } = await run("npx", ["tsx", "tests/api/replication-probe.ts", device.id, device.apiKey], {
    env: { ...process.env, DATABASE_URL: withSession(base, "halftrip_primary"), DATABASE_REPLICA_URLS: withSession(base, "halftrip_replica", true) },
    timeout: 120_000,
  });
  probes = JSON.parse(stdout.trim().split("\n").at(-1)!);
}, 180_000);

describe("read replicas (DATABASE_REPLICA_URLS)", () => {
  it("sends plain reads to the read pool, whatever their parameters", () => {
    for (const name of ["plainRead", "namedRead", "preparedRead"]) {
      expect(probes[name], name).toEqual({ pools: ["read"], answer: "halftrip_replica" });
    }
    expect(probes.modelRead).toEqual({ pools: ["read"], answer: { session: "halftrip_replica" } });
  });

  it("sends writes, transactions and reads that must see them to the primary", () => {
    for (const name of ["write", "primaryRead", "readInOnPrimary", "readInTransaction"]) {
      expect(probes[name], name).toEqual({ pools: ["write"], answer: "halftrip_primary" });
    }
  });

  it("runs the ingest path on the primary: the device-key check and the INSERT", () => {
    expect(probes.keyCheck).toEqual({ pools: ["write"], answer: true });
    expect(probes.ingest).toEqual({ pools: ["write"], answer: 1 });
  });
});
