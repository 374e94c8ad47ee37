// Dashboard benchmark (`npm run bench:dashboard`): a fresh database with 2,000 channels × 30 days of
// measurements (10 million rows, generated in SQL) and their 5-minute and hourly rollups, the
// production server on it, and from a second process the fleet overview, a site, the alarms table
// and a 30-day asset series under load. Prints p50/p95/p99 and CPU per request per route (targets, issue 16: p95 ≤ 50 ms at
// one client, ≤ 100 ms at four) and the wire size of the 30-day hourly series (target < 60 KB).
//
// Options: BENCH_CHANNELS (2000), BENCH_PER_CHANNEL (5000 measurements over 30 days), BENCH_SECONDS
// (10 a route and concurrency), BENCH_CONNECTIONS (1,4), BENCH_SKIP_BUILD=1 (reuse the last build), --keep (leave the database),
// BENCH_REUSE_DB=<name> (measure a database a --keep run left, without seeding or dropping it), BENCH_PORT
// (a free port by default). Beside latency each route prints the server side's CPU time per request (the
// web server's processes and the database backends, from /proc), which a busy machine distorts far less.
// The load side is this file again: `tsx scripts/bench-dashboard.ts --load <url> <cookie> <path> <s> <connections>`.
import { execFileSync, spawn, type ChildProcess } from "node:child_process";
import { randomBytes, randomUUID } from "node:crypto";
import fs from "node:fs";
import http from "node:http";
import net from "node:net";
import { createRequire } from "node:module";
import os from "node:os";
import path from "node:path";
import bcrypt from "bcryptjs";
import { quantileSorted } from "simple-statistics";
import { adminUrl, dbUrl, ensureBenchPostgres, withClient } from "./bench/pg";
import { statFields } from "./bench/pg-cpu";

// autocannon ships no types; the little of it used here, typed.
interface AutocannonInstance extends PromiseLike<{ requests: { average: number }; non2xx: number; errors: number }> {
  on(event: "response", listener: (client: unknown, status: number, resBytes: number, responseTime: number) => void): void;
}
const autocannon = createRequire(__filename)("autocannon") as (opts: { url: string; connections: number; duration: number; headers: Record<string, string> }) => AutocannonInstance;

const root = path.resolve(__dirname, "..");
const CHANNELS = Number(process.env.BENCH_CHANNELS ?? 2000);
const PER_CHANNEL = Number(process.env.BENCH_PER_CHANNEL ?? 5000);
const DAYS = 30;
const SITES = 20;
const SECONDS = Number(process.env.BENCH_SECONDS ?? 10);
// One client at a time (what a person waits for) and four at once (a busy control room on two cores).
const CONNECTIONS = (process.env.BENCH_CONNECTIONS ?? "1,4").split(",").map(Number);
const DIST_DIR = ".next-bench-dashboard";
const TARGET_P95_MS: Record<number, number> = { 1: 50, 4: 100 };
const TARGET_SERIES_BYTES = 60 * 1024;
// The figures the asset screen's trend draws (components/asset-live.tsx), column-wise.
const SERIES_FIELDS = "distance_m,level_m,air_temp_c,uncertainty_m";
const EMAIL = "bench-operator@halftrip.test";
const PASSWORD = randomBytes(12).toString("hex");

function log(message: string) {
  process.stdout.write(`[bench:dashboard] ${message}\n`);
}

// Invented bench fleet: 20 sites, 8-channel devices reporting about every 8.6 min (30 days / 5 000),
// half the channels on vertical tanks (2 m across, 2.5 m tall) drawn down and refilled, 30 % on bays
// with cars coming and going, 20 % on fixed distance points; the air temperature swings daily.
function fleetSql(passwordHash: string): string {
  return `
    INSERT INTO organisations (name) VALUES ('Bench organisation');
    INSERT INTO users (organisation_id, email, name, role, status, password_hash)
      SELECT id, '${EMAIL}', 'Bench operator', 'operator', 'active', '${passwordHash}' FROM organisations;
    INSERT INTO sites (organisation_id, name, time_zone, air_temp_c)
      SELECT o.id, 'Bench site ' || lpad(s::text, 2, '0'), 'Europe/London', 12 FROM organisations o, generate_series(0, ${SITES - 1}) s;
    CREATE TABLE bench_sites AS SELECT id, row_number() OVER (ORDER BY name) - 1 AS n FROM sites;
    INSERT INTO devices (organisation_id, site_id, serial, name, profile, expected_interval_s, firmware, last_seen_at, battery_v, rssi_dbm)
      SELECT (SELECT id FROM organisations), (SELECT id FROM bench_sites WHERE n = d % ${SITES}), 'BENCH-' || d, 'Bench device ' || lpad(d::text, 4, '0'),
             'echo', 600, '2.' || (d % 5) || '.0', now() - (d % 60) * interval '1 second', 3.5 + (d % 7) * 0.1, -60 - d % 40
      FROM generate_series(0, ${Math.ceil(CHANNELS / 8) - 1}) d;
    CREATE TABLE bench_devices AS SELECT id, site_id, (substring(serial from 7))::int AS n FROM devices;
    INSERT INTO assets (organisation_id, site_id, kind, name, mount_height_m, capacity_l, safe_fill_pct, reorder_pct, geometry, floor_distance_m, occupied_below_m, bay_row, bay_col, bay_level)
      SELECT (SELECT id FROM organisations), bd.site_id,
             CASE WHEN j % 10 < 5 THEN 'tank'::asset_kind WHEN j % 10 < 8 THEN 'bay'::asset_kind ELSE 'point'::asset_kind END,
             'Bench asset ' || lpad(j::text, 4, '0'),
             CASE WHEN j % 10 < 5 THEN 3.0 END,
             CASE WHEN j % 10 < 5 THEN pi() * 2.5 * 1000 END,
             CASE WHEN j % 10 < 5 THEN 90 END,
             CASE WHEN j % 10 < 5 THEN 25 END,
             CASE WHEN j % 10 < 5 THEN '{"shape":"vertical_cylinder","diameter_m":2,"height_m":2.5,"bottom":"flat","bottom_depth_m":0}'::jsonb END,
             CASE WHEN j % 10 BETWEEN 5 AND 7 THEN 2.5 WHEN j % 10 >= 8 THEN 1.5 END,
             CASE WHEN j % 10 BETWEEN 5 AND 7 THEN 1.9 END,
             CASE WHEN j % 10 BETWEEN 5 AND 7 THEN (j / 80) % 4 END,
             CASE WHEN j % 10 BETWEEN 5 AND 7 THEN (j / 10) % 8 * 3 + j % 10 - 5 END,
             CASE WHEN j % 10 BETWEEN 5 AND 7 THEN 'Level ' || (j / 320) END
      FROM generate_series(0, ${CHANNELS - 1}) j JOIN bench_devices bd ON bd.n = j / 8;
    INSERT INTO channels (device_id, index, asset_id, max_range_m)
      SELECT bd.id, j % 8, a.id, 4
      FROM generate_series(0, ${CHANNELS - 1}) j JOIN bench_devices bd ON bd.n = j / 8 JOIN assets a ON a.name = 'Bench asset ' || lpad(j::text, 4, '0');
    CREATE TABLE bench_channels AS
      SELECT c.id, c.device_id, c.index, c.asset_id, (substring(a.name from 13))::int AS j FROM channels c JOIN assets a ON a.id = c.asset_id;
  `;
}

function measurementsSql(fromJ: number, toJ: number): string {
  const stepS = (DAYS * 86400) / PER_CHANNEL;
  return `
    WITH g AS (
      SELECT bc.*, k, now() - ((${PER_CHANNEL - 1} - k) * ${stepS} * interval '1 second') + bc.index * interval '100 milliseconds' AS at
      FROM bench_channels bc, generate_series(0, ${PER_CHANNEL - 1}) k
      WHERE bc.j BETWEEN ${fromJ} AND ${toJ}
    ), t AS (
      SELECT g.*, 12 + 6 * sin(2 * pi() * extract(epoch FROM at) / 86400) AS temp_c,
             CASE WHEN j % 10 < 5 THEN 0.5 + 1.8 * (1 - ((k + j * 37) % 1500) / 1500.0) END AS level_m,
             CASE WHEN j % 10 BETWEEN 5 AND 7 THEN (k / 12 + j) % 3 = 0 END AS occupied
      FROM g
    ), d AS (
      SELECT t.*, 331.3 * sqrt(1 + temp_c / 273.15) AS c,
             CASE WHEN level_m IS NOT NULL THEN 3.0 - level_m WHEN occupied THEN 1.2 WHEN occupied IS NOT NULL THEN 2.5 ELSE 1.5 END
               + 0.002 * (random() - 0.5) AS distance_m,
             CASE WHEN random() < 0.005 THEN 'no_echo' ELSE 'ok' END AS status
      FROM t
    )
    INSERT INTO measurements (reading_id, at, device_id, channel_index, channel_id, asset_id, status, tof_us, air_temp_c, temp_source, speed_of_sound_ms,
                              sound_model, raw_distance_m, distance_m, level_m, volume_l, fill_pct, ullage_l, occupied, uncertainty_m)
    SELECT j::bigint * ${PER_CHANNEL} + k, at, device_id, index, id, asset_id, status,
           CASE WHEN status = 'ok' THEN 2e6 * distance_m / c ELSE 37000 END, temp_c, 'site_fixed', c, 'dry',
           CASE WHEN status = 'ok' THEN distance_m END, CASE WHEN status = 'ok' THEN distance_m END,
           CASE WHEN status = 'ok' AND level_m IS NOT NULL THEN 3.0 - distance_m END,
           CASE WHEN status = 'ok' AND level_m IS NOT NULL THEN pi() * (3.0 - distance_m) * 1000 END,
           CASE WHEN status = 'ok' AND level_m IS NOT NULL THEN (3.0 - distance_m) / 2.5 * 100 END,
           CASE WHEN status = 'ok' AND level_m IS NOT NULL THEN pi() * (2.5 - (3.0 - distance_m)) * 1000 END,
           CASE WHEN status = 'ok' THEN occupied END,
           CASE WHEN status = 'ok' THEN 0.006 END
    FROM d`;
}

const ROLLUP_SUMS = `count(*), count(*) FILTER (WHERE status = 'ok'),
  sum(distance_m) FILTER (WHERE status = 'ok'), min(distance_m), max(distance_m),
  sum(level_m) FILTER (WHERE status = 'ok'), min(level_m), max(level_m),
  sum(volume_l) FILTER (WHERE status = 'ok'), min(volume_l), max(volume_l),
  sum(fill_pct) FILTER (WHERE status = 'ok'), min(fill_pct), max(fill_pct),
  sum(air_temp_c) FILTER (WHERE status = 'ok'), min(air_temp_c) FILTER (WHERE status = 'ok'), max(air_temp_c) FILTER (WHERE status = 'ok'),
  count(air_temp_c) FILTER (WHERE status = 'ok'), sum(uncertainty_m) FILTER (WHERE status = 'ok'), count(*) FILTER (WHERE occupied)`;
const ROLLUP_COLUMNS = `asset_id, channel_id, bucket_s, bucket_start, n_all, n, distance_sum, distance_min, distance_max, level_sum, level_min, level_max,
  volume_sum, volume_min, volume_max, fill_sum, fill_min, fill_max, air_temp_sum, air_temp_min, air_temp_max, air_temp_n, uncertainty_sum, occupied_n`;

function fiveMinuteRollupsSql(fromJ: number, toJ: number): string {
  return `
    INSERT INTO measurement_rollups (${ROLLUP_COLUMNS})
    SELECT m.asset_id, m.channel_id, 300, date_bin('5 minutes', m.at, timestamptz 'epoch') AS b, ${ROLLUP_SUMS}
    FROM measurements m JOIN bench_channels bc ON bc.id = m.channel_id
    WHERE bc.j BETWEEN ${fromJ} AND ${toJ}
    GROUP BY m.asset_id, m.channel_id, b`;
}

// Hourly buckets from the 5-minute ones, as sums, minima and maxima combine.
const HOURLY_ROLLUPS_SQL = `
  INSERT INTO measurement_rollups (${ROLLUP_COLUMNS})
  SELECT asset_id, channel_id, 3600, date_bin('1 hour', bucket_start, timestamptz 'epoch') AS b, sum(n_all), sum(n),
         sum(distance_sum), min(distance_min), max(distance_max), sum(level_sum), min(level_min), max(level_max),
         sum(volume_sum), min(volume_min), max(volume_max), sum(fill_sum), min(fill_min), max(fill_max),
         sum(air_temp_sum), min(air_temp_min), max(air_temp_max), sum(air_temp_n), sum(uncertainty_sum), sum(occupied_n)
  FROM measurement_rollups WHERE bucket_s = 300
  GROUP BY asset_id, channel_id, b`;

// What the worker and the alarm stage would have left: channel state, bay sessions, a few open sensor
// flags, tank forecasts, setpoints with their alarms (about one in twenty needing attention) and events.
const STATE_SQL = `
  INSERT INTO channel_state (channel_id, last_at, last_reading_id)
    SELECT channel_id, max(at), max(reading_id) FROM measurements GROUP BY channel_id;
  INSERT INTO channel_latest (channel_id, reading_id, at, distance_m, level_m, volume_l, fill_pct, uncertainty_m, occupied)
    SELECT c.id, m.reading_id, m.at, m.distance_m, m.level_m, m.volume_l, m.fill_pct, m.uncertainty_m, m.occupied
    FROM channels c CROSS JOIN LATERAL (
      SELECT * FROM measurements m WHERE m.channel_id = c.id AND m.status = 'ok' ORDER BY m.at DESC, m.reading_id DESC LIMIT 1
    ) m;
  INSERT INTO occupancy_sessions (asset_id, channel_id, started_at, ended_at, duration_s)
    SELECT bc.asset_id, bc.id, now() - interval '3 hours', CASE WHEN bc.j % 3 = 0 THEN NULL ELSE now() - interval '40 minutes' END, 8400
    FROM bench_channels bc WHERE bc.j % 10 BETWEEN 5 AND 7;
  INSERT INTO health_flags (channel_id, flag, since, magnitude)
    SELECT id, (ARRAY['drift', 'stuck', 'noisy', 'no_echo'])[1 + j % 4], now() - (j % 48) * interval '1 hour', 0.01 FROM bench_channels WHERE j % 50 = 3;
  INSERT INTO tank_forecasts (asset_id, computed_at, window_start, window_end, samples, current_volume_l, slope_l_per_day, purpose, status, action, ready,
                              span_hours, points, r_squared, due_at, limit_at, volume_l, rate_l_per_day)
    SELECT asset_id, now(), now() - interval '7 days', now(), 168, 4000, -600, 'supply', 'due', 'deliver', true, 160, 160, 0.97,
           now() + interval '3.4 days', now() + interval '6.7 days', 3500, 600
    FROM bench_channels WHERE j % 10 < 5;
  INSERT INTO alarm_setpoints (asset_id, key, value_m, entered_value, deadband_m, on_delay_s, priority)
    SELECT bc.asset_id, sp.key, sp.value_m, sp.value_m, 0.125, 60, sp.priority
    FROM bench_channels bc, (VALUES ('hh', 2.4, 'high'), ('h', 2.2, 'medium'), ('l', 0.7, 'medium'), ('ll', 0.4, 'high')) sp(key, value_m, priority)
    WHERE bc.j % 10 < 5;
  INSERT INTO alarms (organisation_id, site_id, asset_id, kind, priority, state, condition_active, episode, activations, activated_at, value, setpoint, unit, last_change_at)
    SELECT a.organisation_id, a.site_id, a.id, sp.key, sp.priority,
           CASE WHEN (bc.j + length(sp.key)) % 20 = 0 THEN 'unacknowledged' WHEN (bc.j + length(sp.key)) % 20 = 1 THEN 'acknowledged' ELSE 'normal' END,
           (bc.j + length(sp.key)) % 20 < 2, 3, 3, now() - (bc.j % 72) * interval '1 hour', 2.3, sp.value_m, 'm', now() - (bc.j % 72) * interval '1 hour'
    FROM bench_channels bc JOIN assets a ON a.id = bc.asset_id JOIN alarm_setpoints sp ON sp.asset_id = a.id;
  INSERT INTO alarm_events (alarm_id, organisation_id, at, kind, from_state, to_state, cause, value, setpoint, priority, episode)
    SELECT al.id, al.organisation_id, now() - (e * 7 + 1) * interval '1 hour', 'condition', 'normal', 'unacknowledged', 'condition_active', 2.3, al.setpoint, al.priority, e
    FROM alarms al, generate_series(1, 5) e;
  DROP TABLE bench_sites, bench_devices, bench_channels;
  ANALYZE;`;

async function seed(url: string) {
  const hash = await bcrypt.hash(PASSWORD, 4);
  const started = Date.now();
  await withClient(url, async (c) => {
    await c.query(fleetSql(hash));
    const CHUNK = 250;
    for (let j = 0; j < CHANNELS; j += CHUNK) {
      await c.query(measurementsSql(j, Math.min(CHANNELS, j + CHUNK) - 1));
      log(`measurements: channels ${j + 1}–${Math.min(CHANNELS, j + CHUNK)} of ${CHANNELS} (${((Date.now() - started) / 1000).toFixed(0)} s)`);
    }
    for (let j = 0; j < CHANNELS; j += CHUNK) await c.query(fiveMinuteRollupsSql(j, Math.min(CHANNELS, j + CHUNK) - 1));
    log(`5-minute rollups (${((Date.now() - started) / 1000).toFixed(0)} s)`);
    await c.query(HOURLY_ROLLUPS_SQL);
    await c.query(STATE_SQL);
  });
  const counts = await withClient(url, async (c) => (await c.query(`SELECT (SELECT count(*) FROM measurements) AS m, (SELECT count(*) FROM measurement_rollups) AS r, (SELECT count(*) FROM alarms) AS a`)).rows[0]);
  log(`seeded ${Number(counts.m).toLocaleString("en-GB")} measurements, ${Number(counts.r).toLocaleString("en-GB")} rollup rows, ${counts.a} alarms in ${((Date.now() - started) / 1000).toFixed(0)} s`);
}

/** BENCH_PORT, or a port free now: with a fixed default, a second run on the machine measured the first one's server. */
function serverPort(): Promise<number> {
  if (process.env.BENCH_PORT) return Promise.resolve(Number(process.env.BENCH_PORT));
  return new Promise((resolve, reject) => {
    const probe = net.createServer().once("error", reject);
    probe.listen(0, "127.0.0.1", () => {
      const { port } = probe.address() as net.AddressInfo;
      probe.close(() => resolve(port));
    });
  });
}

async function waitFor(url: string) {
  for (let i = 0; i < 240; i++) {
    try {
      if ((await fetch(url)).ok) return;
    } catch {
      // Still starting.
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`${url} did not come up`);
}

/** The usual next-auth CSRF sign-in flow; returns the cookie header of the session. */
async function signIn(base: string): Promise<string> {
  const jar = new Map<string, string>();
  const keep = (res: Response) => {
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(";");
      const i = pair.indexOf("=");
      jar.set(pair.slice(0, i), pair.slice(i + 1));
    }
  };
  const cookie = () => [...jar].map(([k, v]) => `${k}=${v}`).join("; ");
  const csrf = await fetch(`${base}/api/auth/csrf`);
  keep(csrf);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const res = await fetch(`${base}/api/auth/callback/credentials`, {
    method: "POST",
    redirect: "manual",
    headers: { "content-type": "application/x-www-form-urlencoded", cookie: cookie() },
    body: new URLSearchParams({ csrfToken, email: EMAIL, password: PASSWORD, json: "true" }),
  });
  keep(res);
  const session = await fetch(`${base}/api/auth/session`, { headers: { cookie: cookie() } });
  const body = (await session.json()) as { user?: { id?: string } };
  if (!body.user?.id) throw new Error("bench sign-in failed");
  return cookie();
}

interface LoadResult {
  requests: number;
  rps: number;
  p50: number;
  p95: number;
  p99: number;
  non2xx: number;
  errors: number;
  bytes: number;
}

/** The second process: drives one route with autocannon and prints its latencies as one JSON line. */
async function runLoad(url: string, cookie: string, route: string, seconds: number, connections: number) {
  const times: number[] = [];
  let bytes = 0;
  const instance = autocannon({ url: `${url}${route}`, connections, duration: seconds, headers: { cookie } });
  instance.on("response", (_client, _status, resBytes, responseTime) => {
    times.push(responseTime);
    bytes += resBytes;
  });
  const result = await instance;
  times.sort((a, b) => a - b);
  const q = (p: number) => (times.length ? Number(quantileSorted(times, p).toFixed(1)) : NaN);
  const out: LoadResult = { requests: times.length, rps: result.requests.average, p50: q(0.5), p95: q(0.95), p99: q(0.99), non2xx: result.non2xx, errors: result.errors, bytes: Math.round(bytes / Math.max(1, times.length)) };
  process.stdout.write(`${JSON.stringify(out)}\n`);
}

/** Bytes of one answer as sent: without compression, and gzip-compressed as a browser would ask for it. */
function wireBytes(url: string, cookie: string, encoding: "identity" | "gzip"): Promise<number> {
  return new Promise((resolve, reject) => {
    http.get(url, { headers: { cookie, "accept-encoding": encoding } }, (res) => {
      let bytes = 0;
      res.on("data", (c: Buffer) => (bytes += c.length));
      res.on("end", () => (res.statusCode === 200 ? resolve(bytes) : reject(new Error(`${url}: ${res.statusCode}`))));
    }).on("error", reject);
  });
}

// CPU time the server side spent (the web server's processes and the database's backends of this
// database), read from /proc: a cost per request that a busy machine slows down far less than latency.
const MS_PER_TICK = 1000 / Number(execFileSync("getconf", ["CLK_TCK"], { encoding: "utf8" }).trim() || 100);

interface CpuSnapshot {
  web: Map<number, number>;
  db: Map<number, number>;
}

async function cpuSnapshot(serverGroup: number, url: string, dbName: string): Promise<CpuSnapshot> {
  const ticks = (f: string[]) => Number(f[11]) + Number(f[12]);
  const web = new Map<number, number>();
  for (const entry of fs.readdirSync("/proc")) {
    const f = /^\d+$/.test(entry) ? statFields(Number(entry)) : null;
    if (f && Number(f[2]) === serverGroup) web.set(Number(entry), ticks(f));
  }
  const pids = await withClient(url, async (c) => (await c.query(`SELECT pid FROM pg_stat_activity WHERE datname = $1 AND pid <> pg_backend_pid()`, [dbName])).rows as { pid: number }[]);
  const db = new Map<number, number>();
  for (const { pid } of pids) {
    const f = statFields(pid);
    if (f) db.set(pid, ticks(f));
  }
  return { web, db };
}

/** Milliseconds of CPU between two snapshots; a process that appeared in between counts whole. */
function cpuMs(before: Map<number, number>, after: Map<number, number>): number {
  let ticks = 0;
  for (const [pid, t] of after) ticks += t - (before.get(pid) ?? 0);
  return ticks * MS_PER_TICK;
}

function measure(base: string, cookie: string, route: string, connections: number): LoadResult {
  const out = execFileSync(path.join(root, "node_modules/.bin/tsx"), [__filename, "--load", base, cookie, route, String(SECONDS), String(connections)], { cwd: root, encoding: "utf8" });
  return JSON.parse(out.trim().split("\n").pop() as string) as LoadResult;
}

async function main() {
  await ensureBenchPostgres();
  const reuse = process.env.BENCH_REUSE_DB;
  if (reuse && !/^halftrip_bench_dashboard_[0-9a-f]{8}$/.test(reuse)) throw new Error("BENCH_REUSE_DB names a database an earlier --keep run left");
  const dbName = reuse ?? `halftrip_bench_dashboard_${randomUUID().slice(0, 8)}`;
  const keep = process.argv.includes("--keep") || !!reuse;
  const url = dbUrl(dbName);
  if (reuse) {
    log(`reusing database ${dbName}`);
    // Each run signs in with a password of its own.
    const hash = await bcrypt.hash(PASSWORD, 4);
    await withClient(url, (c) => c.query(`UPDATE users SET password_hash = $1 WHERE email = $2`, [hash, EMAIL]));
  } else {
    log(`database ${dbName}: ${CHANNELS} channels × ${PER_CHANNEL} measurements over ${DAYS} days`);
    await withClient(adminUrl, (c) => c.query(`CREATE DATABASE ${dbName}`));
  }
  let server: ChildProcess | undefined;
  const PORT = await serverPort();
  try {
    const env: NodeJS.ProcessEnv = { ...process.env, DATABASE_URL: url, AUTH_SECRET: randomBytes(16).toString("hex"), NODE_ENV: "production", DB_POOL_MAX: "10", PORT: String(PORT), NEXT_DIST_DIR: DIST_DIR };
    if (!reuse) {
      execFileSync(path.join(root, "node_modules/.bin/tsx"), ["db/migrate.ts", "up"], { cwd: root, env, stdio: "inherit" });
      await seed(url);
    }
    if (process.env.BENCH_SKIP_BUILD === "1" && fs.existsSync(path.join(root, DIST_DIR, "BUILD_ID"))) log(`reusing the build in ${DIST_DIR}`);
    else execFileSync(path.join(root, "node_modules/.bin/next"), ["build"], { cwd: root, env, stdio: "inherit" });
    server = spawn(path.join(root, "node_modules/.bin/next"), ["start", "-H", "127.0.0.1", "-p", String(PORT)], { cwd: root, env, stdio: "ignore", detached: true });
    server.once("exit", (code) => log(`the server exited (${code}) — is port ${PORT} taken?`));
    const base = `http://127.0.0.1:${PORT}`;
    await waitFor(`${base}/api/health`);
    const cookie = await signIn(base);
    const ids = await withClient(url, async (c) => ({
      site: (await c.query(`SELECT id FROM sites ORDER BY name LIMIT 1`)).rows[0].id as string,
      tank: (await c.query(`SELECT id FROM assets WHERE kind = 'tank' ORDER BY name LIMIT 1`)).rows[0].id as string,
    }));
    const to = new Date();
    const from = new Date(to.getTime() - 30 * 86_400_000);
    // The first is a floor, not a target: a signed-in route that reads one small table.
    const routes: [string, string][] = [
      ["baseline: site list", "/api/sites"],
      ["fleet overview", "/api/overview"],
      ["site", `/api/sites/${ids.site}/overview`],
      ["alarms table", "/api/alarms?state=active&sort=priority&page=1&page_size=50"],
      ["30-day asset series", `/api/assets/${ids.tank}/series?from=${from.toISOString()}&to=${to.toISOString()}&bucket=1h&fields=${SERIES_FIELDS}`],
    ];
    const seriesRoute = routes[routes.length - 1][1];
    const fullSeriesRoute = seriesRoute.replace(`&fields=${SERIES_FIELDS}`, "");
    // One request each first, so first-use compilation and cold caches are not measured.
    for (const [, route] of routes) await fetch(`${base}${route}`, { headers: { cookie } });
    const results = [];
    for (const connections of CONNECTIONS) {
      for (const [name, route] of routes) {
        const before = await cpuSnapshot(server.pid as number, url, dbName);
        const load = measure(base, cookie, route, connections);
        const after = await cpuSnapshot(server.pid as number, url, dbName);
        const per = (ms: number) => ms / Math.max(1, load.requests);
        results.push({ name, route, connections, ...load, webCpuMs: per(cpuMs(before.web, after.web)), dbCpuMs: per(cpuMs(before.db, after.db)) });
      }
    }
    log(`machine: ${os.cpus().length} × ${os.cpus()[0]?.model ?? "cpu"}, ${(os.totalmem() / 2 ** 30).toFixed(0)} GiB, Node ${process.version}, load average ${os.loadavg()[0].toFixed(1)}; ${SECONDS} s a route`);
    const wire = {
      compact: await wireBytes(`${base}${seriesRoute}`, cookie, "identity"),
      compactGzip: await wireBytes(`${base}${seriesRoute}`, cookie, "gzip"),
      items: await wireBytes(`${base}${fullSeriesRoute}`, cookie, "identity"),
      itemsGzip: await wireBytes(`${base}${fullSeriesRoute}`, cookie, "gzip"),
    };
    const kb = (b: number) => `${(b / 1024).toFixed(1)} KB`;
    log(`30-day hourly series on the wire: ${kb(wire.compact)} column-wise with the trend's four figures (${kb(wire.compactGzip)} gzip) · ${TARGET_SERIES_BYTES >= wire.compact ? "target met" : "target NOT met"}; every figure as items ${kb(wire.items)} (${kb(wire.itemsGzip)} gzip)`);
    for (const r of results) {
      const target = TARGET_P95_MS[r.connections];
      const verdict = r.non2xx > 0 ? `${r.non2xx} non-2xx answers` : r.name.startsWith("baseline") || !target ? "for comparison" : r.p95 <= target ? `target ≤ ${target} ms met` : `target ≤ ${target} ms NOT met`;
      const cpu = `CPU ${(r.webCpuMs + r.dbCpuMs).toFixed(1)} ms/req (web ${r.webCpuMs.toFixed(1)}, db ${r.dbCpuMs.toFixed(1)})`;
      log(`${r.name.padEnd(20)} ${r.connections} conn · p50 ${String(r.p50).padStart(6)} ms · p95 ${String(r.p95).padStart(6)} ms · p99 ${String(r.p99).padStart(6)} ms · ${r.rps.toFixed(1).padStart(6)} req/s · ${r.bytes} B · ${cpu} · ${verdict}`);
    }
  } finally {
    server?.removeAllListeners("exit");
    if (server?.pid && server.exitCode === null) process.kill(-server.pid, "SIGTERM");
    await new Promise((r) => setTimeout(r, 1000));
    if (!keep) await withClient(adminUrl, (c) => c.query(`DROP DATABASE IF EXISTS ${dbName} WITH (FORCE)`));
    else log(`kept database ${dbName}`);
  }
}

if (process.argv[2] === "--load") {
  const [, , , url, cookie, route, seconds, connections] = process.argv;
  runLoad(url, cookie, route, Number(seconds), Number(connections)).catch((err) => {
    console.error(err);
    process.exit(1);
  });
} else {
  main().catch((err) => {
    console.error(err);
    process.exit(1);
  });
}
