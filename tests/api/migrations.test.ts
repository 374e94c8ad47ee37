import { execFileSync } from "node:child_process";
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import pg from "pg";
import { afterAll, describe, expect, it } from "vitest";

// Runs every migration up on a brand-new empty database, then all the way down and up again.
// The test stack's server (PG_ADMIN_URL), or this clone's own cluster on the port it was given (.data/pg-port).
const admin = process.env.PG_ADMIN_URL ?? `postgres://postgres@127.0.0.1:${fs.readFileSync(path.resolve(".data/pg-port"), "utf8").trim()}/postgres`;
const name = `halftrip_mig_${randomUUID().slice(0, 8)}`;

async function adminQuery(sql: string) {
  const client = new pg.Client({ connectionString: admin });
  await client.connect();
  try { return await client.query(sql); } finally { await client.end(); }
}

function migrate(direction: "up" | "down") {
  const url = new URL(admin);
  url.pathname = `/${name}`;
  return execFileSync(path.resolve("node_modules/.bin/tsx"), ["db/migrate.ts", direction], {
    env: { ...process.env, DATABASE_URL: url.toString() },
    encoding: "utf8",
  });
}

describe("migrations", () => {
  afterAll(async () => {
    await adminQuery(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
  });

  it("run up on an empty database, down, and up again", async () => {
    await adminQuery(`CREATE DATABASE ${name}`);
    expect(migrate("up")).toMatch(/migrations up: 0001/);
    const url = new URL(admin);
    url.pathname = `/${name}`;
    const client = new pg.Client({ connectionString: url.toString() });
    await client.connect();
    const tables = await client.query(`SELECT table_name FROM information_schema.tables WHERE table_schema = 'public'`);
    await client.end();
    expect(tables.rows.map((r) => r.table_name)).toEqual(expect.arrayContaining(["organisations", "users", "audit_log", "invites"]));
    for (;;) {
      const out = migrate("down");
      if (out.includes("nothing to do")) break;
    }
    expect(migrate("up")).toMatch(/migrations up: 0001/);
  }, 120000);
});
