// npm run bench:ingest — the production server on a fresh database, driven from a second process with
// batches of 1, 50 and 500 readings, beside a bare route handler in the same run. Prints figures only.
import { execFileSync, spawn } from "node:child_process";
import { createHash, randomBytes, randomUUID } from "node:crypto";
import os from "node:os";
import path from "node:path";
import pg from "pg";
import { dropDatabase, ensureDatabase, startPostgres } from "./lib/postgres.mjs";
import { log } from "./lib/system.mjs";

const root = path.resolve(import.meta.dirname, "..");
const bin = (n) => path.join(root, "node_modules", ".bin", n);
const PORT = 3300;
const DURATION_S = Number(process.env.BENCH_SECONDS ?? 10);
const DEVICES = 100;

startPostgres();
const dbName = `halftrip_bench_${randomUUID().slice(0, 8)}`;
const databaseUrl = ensureDatabase(dbName);
const env = { ...process.env, DATABASE_URL: databaseUrl, AUTH_SECRET: randomBytes(16).toString("hex"), NODE_ENV: "production", DB_POOL_MAX: "20", PORT: String(PORT), NEXT_DIST_DIR: ".next-bench" };

let server;
try {
  execFileSync(bin("tsx"), ["db/migrate.ts", "up"], { env, stdio: "inherit", cwd: root });
  execFileSync(bin("next"), ["build"], { env, stdio: "inherit", cwd: root });
  const keys = await provisionDevices(databaseUrl);
  server = spawn(bin("next"), ["start", "-p", String(PORT)], { env, cwd: root, stdio: "ignore", detached: true });
  await waitFor(`http://127.0.0.1:${PORT}/api/v1/time`);
  const runs = [];
  for (const [mode, size] of [["bare", 0], ["readings", 1], ["readings", 50], ["readings", 500]]) {
    const out = execFileSync(process.execPath, [path.join(root, "scripts/bench/ingest-load.mjs"), `http://127.0.0.1:${PORT}`, mode, String(size), JSON.stringify(keys), String(DURATION_S)], { encoding: "utf8" });
    const r = JSON.parse(out.trim().split("\n").pop());
    runs.push({ mode, size, ...r, readingsPerS: r.rps * size });
  }
  const bare = runs[0].rps;
  log(`machine: ${os.cpus().length} × ${os.cpus()[0]?.model ?? "cpu"}, ${Math.round(os.totalmem() / 2 ** 30)} GiB, node ${process.version}; ${DURATION_S} s a run, 20 connections`);
  for (const r of runs) {
    const label = r.mode === "bare" ? "bare GET /api/v1/time   " : `batch of ${String(r.size).padEnd(3)} readings    `;
    const ratio = r.mode === "bare" ? "" : ` · ${((r.rps / bare) * 100).toFixed(0)} % of bare`;
    log(`${label} ${r.rps.toFixed(0).padStart(6)} req/s · ${r.readingsPerS.toFixed(0).padStart(7)} readings/s · p50 ${r.p50} ms · p99 ${r.p99} ms · non-2xx ${r.non2xx}${ratio}`);
  }
} finally {
  if (server?.pid) process.kill(-server.pid, "SIGTERM");
  await new Promise((r) => setTimeout(r, 1000));
  dropDatabase(dbName);
}

async function provisionDevices(url) {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  const org = (await client.query(`INSERT INTO organisations (name) VALUES ('Bench organisation') RETURNING id`)).rows[0].id;
  const site = (await client.query(`INSERT INTO sites (organisation_id, name, time_zone) VALUES ($1, 'Bench site', 'UTC') RETURNING id`, [org])).rows[0].id;
  const keys = [];
  for (let i = 0; i < DEVICES; i++) {
    const device = (await client.query(`INSERT INTO devices (organisation_id, site_id, serial, name, profile, max_requests_per_min) VALUES ($1, $2, $3, $3, 'echo', 100000) RETURNING id`, [org, site, `BENCH-${i}`])).rows[0].id;
    await client.query(`INSERT INTO channels (device_id, index) SELECT $1, g FROM generate_series(0, 7) g`, [device]);
    const prefix = randomBytes(6).toString("hex");
    const key = `ht_${prefix}_${randomBytes(32).toString("base64url")}`;
    await client.query(`INSERT INTO device_keys (device_id, prefix, key_hash) VALUES ($1, $2, $3)`, [device, prefix, createHash("sha256").update(key).digest()]);
    keys.push(key);
  }
  await client.end();
  return keys;
}

async function waitFor(url) {
  for (let i = 0; i < 240; i++) {
    try { if ((await fetch(url)).ok) return; } catch { /* starting */ }
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`${url} did not come up`);
}
