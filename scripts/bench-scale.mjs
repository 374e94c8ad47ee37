// npm run bench:scale — the multi-machine shape on this machine (scripts/lib/scale-stack.mjs: a
// streaming replica, two `next start` instances behind HAProxy, DATABASE_REPLICA_URLS on), measured
// from a second process: device batches through the load balancer while the dashboard routes are read,
// first beside one worker, then beside two on the same backlog. Then a read-only window for the share of
// reads the replica served, counted by the servers themselves (pg_stat_database). Prints figures; the
// last line is one JSON object. Everything stops and is removed at the end, on error too, and after
// BENCH_MAX_MINUTES (20) at the latest.
//
// Options: BENCH_SECONDS (20 a phase), BENCH_DEVICES (50 eight-channel devices, each channel a tank),
// BENCH_BATCH (500 readings a request), BENCH_INGEST_CONNECTIONS (6).
import { execFile } from "node:child_process";
import { createHash, randomBytes } from "node:crypto";
import os from "node:os";
import path from "node:path";
import bcrypt from "bcryptjs";
import pg from "pg";
import { quantile } from "simple-statistics";
import { startScaleStack } from "./lib/scale-stack.mjs";
import { log } from "./lib/system.mjs";

const root = path.resolve(import.meta.dirname, "..");
const SECONDS = Number(process.env.BENCH_SECONDS ?? 20);
const DEVICES = Number(process.env.BENCH_DEVICES ?? 50);
const BATCH = Number(process.env.BENCH_BATCH ?? 500);
const INGEST_CONNECTIONS = Number(process.env.BENCH_INGEST_CONNECTIONS ?? 6);
const MAX_MS = Number(process.env.BENCH_MAX_MINUTES ?? 20) * 60_000;
// Workers start after this much backlog has come in, so they have work from their first cycle; their
// rate counts from their start until the queue is empty again.
const BACKLOG_HEAD_START_S = 4;
const READ_WINDOW_S = 10;
// PostgreSQL 15 backends flush their statistics when idle, at the latest after 10 s.
const STATS_FLUSH_MS = 11_000;
const EMAIL = "scale-operator@halftrip.test";
const PASSWORD = randomBytes(12).toString("hex");

const sleep = (ms) => new Promise((r) => setTimeout(r, ms));

setTimeout(() => {
  log(`bench:scale ran past ${MAX_MS / 60000} minutes: stopping`);
  process.exit(1);
}, MAX_MS).unref();
for (const signal of ["SIGINT", "SIGTERM"]) process.on(signal, () => process.exit(130));

/** An invented fleet: one site of tanks, each channel of each device on its own tank, 30 days of hourly rollups. */
async function provisionFleet(client) {
  const hash = await bcrypt.hash(PASSWORD, 4);
  const org = (await client.query(`INSERT INTO organisations (name) VALUES ('Scale bench organisation') RETURNING id`)).rows[0].id;
  await client.query(`INSERT INTO users (organisation_id, email, name, role, status, password_hash) VALUES ($1, $2, 'Scale operator', 'operator', 'active', $3)`, [org, EMAIL, hash]);
  const site = (await client.query(`INSERT INTO sites (organisation_id, name, time_zone) VALUES ($1, 'Scale bench site', 'Europe/London') RETURNING id`, [org])).rows[0].id;
  const keys = [];
  for (let d = 0; d < DEVICES; d++) {
    const device = (await client.query(
      `INSERT INTO devices (organisation_id, site_id, serial, name, profile, expected_interval_s, max_requests_per_min) VALUES ($1, $2, $3, $3, 'echo', 60, 1000000) RETURNING id`,
      [org, site, `SCALE-${d}`],
    )).rows[0].id;
    await client.query(
      `WITH a AS (
         INSERT INTO assets (organisation_id, site_id, kind, name, mount_height_m, capacity_l, safe_fill_pct, reorder_pct, geometry)
         SELECT $1, $2, 'tank', 'Scale tank ' || lpad(($4 * 8 + g)::text, 4, '0'), 3.0, pi() * 2.5 * 1000, 90, 25,
                '{"shape":"vertical_cylinder","diameter_m":2,"height_m":2.5,"bottom":"flat","bottom_depth_m":0}'::jsonb
         FROM generate_series(0, 7) g RETURNING id, name)
       INSERT INTO channels (device_id, index, asset_id, max_range_m) SELECT $3, (right(a.name, 4))::int % 8, a.id, 4 FROM a`,
      [org, site, device, d],
    );
    const prefix = randomBytes(6).toString("hex");
    const key = `ht_${prefix}_${randomBytes(32).toString("base64url")}`;
    await client.query(`INSERT INTO device_keys (device_id, prefix, key_hash) VALUES ($1, $2, $3)`, [device, prefix, createHash("sha256").update(key).digest()]);
    keys.push(key);
  }
  await client.query(
    `INSERT INTO measurement_rollups (asset_id, channel_id, bucket_s, bucket_start, n_all, n, distance_sum, distance_min, distance_max, level_sum, level_min, level_max,
                                      volume_sum, volume_min, volume_max, fill_sum, fill_min, fill_max, air_temp_sum, air_temp_min, air_temp_max, air_temp_n, uncertainty_sum)
     SELECT c.asset_id, c.id, 3600, h, 60, 60, 60 * (1 + x), 1 + x, 1 + x, 60 * (2 - x), 2 - x, 2 - x, 60 * pi() * (2 - x) * 1000, pi() * (2 - x) * 1000, pi() * (2 - x) * 1000,
            60 * (2 - x) / 2.5 * 100, (2 - x) / 2.5 * 100, (2 - x) / 2.5 * 100, 60 * 12, 10, 14, 60, 60 * 0.006
     FROM channels c JOIN devices d ON d.id = c.device_id AND d.organisation_id = $1,
          generate_series(date_trunc('hour', now()) - interval '30 days', date_trunc('hour', now()) - interval '1 hour', interval '1 hour') h,
          LATERAL (SELECT (extract(epoch FROM h)::bigint / 3600 % 500) / 500.0 AS x) v`,
    [org],
  );
  await client.query(`ANALYZE`);
  const asset = (await client.query(`SELECT a.id FROM assets a WHERE a.site_id = $1 ORDER BY a.name LIMIT 1`, [site])).rows[0].id;
  return { org, site, asset, keys };
}

/** next-auth's CSRF sign-in flow through the load balancer; returns the session cookie. */
async function signIn(base) {
  const jar = new Map();
  const keep = (res) => {
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(";");
      const i = pair.indexOf("=");
      jar.set(pair.slice(0, i), pair.slice(i + 1));
    }
  };
  const cookie = () => [...jar].map(([k, v]) => `${k}=${v}`).join("; ");
  const csrf = await fetch(`${base}/api/auth/csrf`);
  keep(csrf);
  const { csrfToken } = await csrf.json();
  keep(await fetch(`${base}/api/auth/callback/credentials`, {
    method: "POST",
    redirect: "manual",
    headers: { "content-type": "application/x-www-form-urlencoded", cookie: cookie() },
    body: new URLSearchParams({ csrfToken, email: EMAIL, password: PASSWORD, json: "true" }),
  }));
  const session = await (await fetch(`${base}/api/auth/session`, { headers: { cookie: cookie() } })).json();
  if (!session?.user?.id) throw new Error("bench sign-in failed");
  return cookie();
}

function runLoad(config) {
  return new Promise((resolve, reject) => {
    execFile(process.execPath, [path.join(root, "scripts/bench/scale-load.mjs"), JSON.stringify(config)], { maxBuffer: 256 * 2 ** 20 }, (err, stdout, stderr) => {
      if (err) return reject(new Error(`load process failed: ${err.message}\n${stderr}`));
      resolve(JSON.parse(stdout.trim().split("\n").pop()));
    });
  });
}

async function databaseStats(client, dbName) {
  const r = await client.query(
    `SELECT xact_commit + xact_rollback AS xacts, tup_returned + tup_fetched AS read_tuples, tup_inserted + tup_updated + tup_deleted AS written_tuples
     FROM pg_stat_database WHERE datname = $1`,
    [dbName],
  );
  return Object.fromEntries(Object.entries(r.rows[0]).map(([k, v]) => [k, Number(v)]));
}

const p95 = (times) => (times.length ? Math.round(quantile(times, 0.95) * 10) / 10 : null);

async function main() {
  const stack = await startScaleStack({ seedDemo: false });
  const primary = new pg.Client({ connectionString: stack.databaseUrl });
  const primaryAdmin = new pg.Client({ connectionString: `postgres://postgres@127.0.0.1:${stack.primaryPort}/postgres` });
  const replicaAdmin = new pg.Client({ connectionString: `postgres://postgres@127.0.0.1:${stack.replicaPort}/postgres` });
  try {
    await Promise.all([primary.connect(), primaryAdmin.connect(), replicaAdmin.connect()]);
    const fleet = await provisionFleet(primary);
    const cookie = await signIn(stack.lbUrl);
    const to = new Date();
    const from = new Date(to.getTime() - 30 * 86_400_000);
    const routes = {
      overview: "/api/overview",
      site: `/api/sites/${fleet.site}/overview`,
      alarms: "/api/alarms?state=active&sort=priority&page=1&page_size=50",
      series_30d: `/api/assets/${fleet.asset}/series?from=${from.toISOString()}&to=${to.toISOString()}&bucket=1h`,
    };
    for (const route of Object.values(routes)) {
      const res = await fetch(`${stack.lbUrl}${route}`, { headers: { cookie } });
      if (!res.ok) throw new Error(`${route} answered ${res.status}`);
    }
    const replicaWritesBefore = (await databaseStats(replicaAdmin, stack.dbName)).written_tuples;
    const countRows = async () => {
      const r = await primary.query(`SELECT (SELECT count(*) FROM measurements)::bigint AS m, (SELECT count(*) FROM reading_queue)::bigint AS q`);
      return { m: Number(r.rows[0].m), q: Number(r.rows[0].q) };
    };

    let errors = 0;
    let accepted = 0;
    const lags = [];
    const dashboardTimes = Object.fromEntries(Object.keys(routes).map((k) => [k, []]));
    const ingestPerS = {};
    const workerPerS = {};
    const notes = [];
    for (const [phase, workerCount] of [1, 2].entries()) {
      log(`phase ${phase + 1}: ingest and dashboards for ${SECONDS} s beside ${workerCount} worker(s)`);
      const load = runLoad({ lbUrl: stack.lbUrl, keys: fleet.keys, seconds: SECONDS, batch: BATCH, ingestConnections: INGEST_CONNECTIONS, seqBase: (phase + 1) * 10_000_000, cookie, routes });
      let loadDone = false;
      load.finally(() => { loadDone = true; }).catch(() => undefined);
      await sleep(BACKLOG_HEAD_START_S * 1000);
      const workers = Array.from({ length: workerCount }, () => stack.startWorker());
      const workersFrom = { t: Date.now(), ...(await countRows()) };
      while (!loadDone) {
        const lag = await primaryAdmin.query(`SELECT coalesce(max(extract(epoch FROM replay_lag) * 1000), 0) AS ms, count(*) AS n FROM pg_stat_replication`);
        if (Number(lag.rows[0].n) === 0) throw new Error("the replica is not streaming");
        lags.push(Number(lag.rows[0].ms));
        await sleep(250);
      }
      const result = await load;
      ingestPerS[workerCount] = Math.round(result.ingest.accepted / SECONDS);
      accepted += result.ingest.accepted;
      const refused = result.ingest.requests - (result.ingest.statuses[202] ?? 0);
      errors += refused + result.ingest.errors;
      if (refused || result.ingest.errors) notes.push(`phase ${phase + 1}: ingest answers ${JSON.stringify(result.ingest.statuses)}, ${result.ingest.errors} socket errors`);
      for (const [name, r] of Object.entries(result.dashboard)) {
        dashboardTimes[name].push(...r.times);
        errors += r.non2xx + r.errors;
        if (r.non2xx || r.errors) notes.push(`phase ${phase + 1}: ${name} ${r.non2xx} non-2xx, ${r.errors} errors`);
      }
      // The workers' rate over the same backlog: from their start until the queue is empty again.
      const drainUntil = Date.now() + 180_000;
      let rows = await countRows();
      while (rows.q > 0 && Date.now() < drainUntil) {
        await sleep(250);
        rows = await countRows();
      }
      if (rows.q > 0) notes.push(`phase ${phase + 1}: ${rows.q} readings still queued after 3 minutes`);
      workerPerS[workerCount] = Math.round((rows.m - workersFrom.m) / ((Date.now() - workersFrom.t) / 1000));
      await Promise.all(workers.map((w) => stack.stopChild(w)));
      for (const w of workers) {
        const { code, signal } = await w.exited;
        if (code !== 0 && signal !== "SIGTERM") { errors += 1; notes.push(`a worker ended with ${signal ?? code}`); }
      }
      log(`phase ${phase + 1}: ${ingestPerS[workerCount]} readings/s accepted, workers ${workerPerS[workerCount]} readings/s`);
    }

    // Every accepted reading is stored once and measured once.
    const check = (await primary.query(
      `SELECT (SELECT count(*) FROM readings r JOIN devices d ON d.id = r.device_id WHERE d.organisation_id = $1)::bigint AS readings,
              (SELECT count(*) FROM measurements m JOIN devices d ON d.id = m.device_id WHERE d.organisation_id = $1)::bigint AS measurements,
              (SELECT count(DISTINCT reading_id) FROM measurements m JOIN devices d ON d.id = m.device_id WHERE d.organisation_id = $1)::bigint AS measured,
              (SELECT count(*) FROM reading_queue)::bigint AS queued`,
      [fleet.org],
    )).rows[0];
    const counts = Object.fromEntries(Object.entries(check).map(([k, v]) => [k, Number(v)]));
    // A request still in flight when the load generator stopped may be stored without its 202 being seen.
    if (counts.readings < accepted || counts.measurements !== counts.readings || counts.measured !== counts.readings || counts.queued !== 0) {
      errors += 1;
      notes.push(`accepted ${accepted}, stored ${counts.readings}, measurements ${counts.measurements} (${counts.measured} distinct), still queued ${counts.queued}`);
    }

    // Reads only: which server answered, by each server's own transaction count for the database.
    log(`read-only window: dashboards for ${READ_WINDOW_S} s`);
    await sleep(STATS_FLUSH_MS);
    const before = { primary: await databaseStats(primaryAdmin, stack.dbName), replica: await databaseStats(replicaAdmin, stack.dbName) };
    const reads = await runLoad({ lbUrl: stack.lbUrl, keys: [], seconds: READ_WINDOW_S, batch: 0, ingestConnections: 0, seqBase: 0, cookie, routes });
    for (const [name, r] of Object.entries(reads.dashboard)) {
      errors += r.non2xx + r.errors;
      if (r.non2xx || r.errors) notes.push(`read window: ${name} ${r.non2xx} non-2xx, ${r.errors} errors`);
    }
    await sleep(STATS_FLUSH_MS);
    const after = { primary: await databaseStats(primaryAdmin, stack.dbName), replica: await databaseStats(replicaAdmin, stack.dbName) };
    const onReplica = after.replica.xacts - before.replica.xacts;
    const onPrimary = after.primary.xacts - before.primary.xacts;
    const requests = Object.values(reads.dashboard).reduce((s, r) => s + r.times.length, 0);
    log(`read-only window: ${requests} dashboard requests; transactions on the replica ${onReplica}, on the primary ${onPrimary} (HAProxy's health checks included)`);

    const inRecovery = (await replicaAdmin.query(`SELECT pg_is_in_recovery() AS r`)).rows[0].r === true;
    const replicaWrites = (await databaseStats(replicaAdmin, stack.dbName)).written_tuples - replicaWritesBefore;
    const writesOnPrimary = inRecovery && replicaWrites === 0 && counts.readings >= accepted && counts.measurements === counts.readings;
    log(`writes: the replica is ${inRecovery ? "read-only (in recovery)" : "NOT in recovery"}, tuples written there ${replicaWrites}; the primary stored ${counts.readings} readings and ${counts.measurements} measurements`);

    lags.sort((a, b) => a - b);
    log(`machine: ${os.cpus().length} × ${os.cpus()[0]?.model ?? "cpu"}, ${Math.round(os.totalmem() / 2 ** 30)} GiB, Node ${process.version}, load average ${os.loadavg().map((l) => l.toFixed(1)).join(" ")}`);
    for (const n of notes) log(`note: ${n}`);
    const result = {
      replica: true,
      replica_lag_ms_p95: lags.length ? Math.round(quantile(lags, 0.95) * 10) / 10 : null,
      reads_on_replica_pct: onReplica + onPrimary ? Math.round((1000 * onReplica) / (onReplica + onPrimary)) / 10 : 0,
      writes_on_primary: writesOnPrimary,
      web_instances: stack.webs.length,
      ingest_readings_per_s: ingestPerS,
      worker_readings_per_s: workerPerS,
      dashboard_p95_ms: Object.fromEntries(Object.entries(dashboardTimes).map(([k, t]) => [k, p95(t)])),
      errors,
    };
    return result;
  } finally {
    await Promise.allSettled([primary.end(), primaryAdmin.end(), replicaAdmin.end()]);
    await stack.stop();
  }
}

main().then(
  (result) => {
    process.stdout.write(`${JSON.stringify(result)}\n`);
    process.exit(0);
  },
  (err) => {
    console.error(err);
    process.exit(1);
  },
);
