// Worker benchmark (`npm run bench:worker`): a fresh database with 2,000 channels and a backlog of
// 1,000,000 queued readings generated in SQL, then ONE worker (`workers/worker.ts --once`, bundled as production runs it, a child
// process) drains it. Prints readings/s and the worker's peak RSS, and checks that every reading got
// exactly one measurement. Target (issue 4): ≥ 50,000 readings/s and ≤ 300 MB RSS.
//
// Options: BENCH_READINGS (default 1000000), BENCH_CHANNELS (2000), WORKER_BATCH_SIZE, --keep (leave the database).
import { spawn } from "node:child_process";
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { execFileSync } from "node:child_process";
import { adminUrl, dbUrl, ensureBenchPostgres, withClient } from "./bench/pg";
import { QUEUE_INSERTED, RETURNING_QUEUED_COLUMNS } from "../lib/worker/reading-queue";

const readingsWanted = Number(process.env.BENCH_READINGS ?? 1_000_000);
const channels = Number(process.env.BENCH_CHANNELS ?? 2000);
const keep = process.argv.includes("--keep");
const dbName = `halftrip_bench_worker_${randomUUID().slice(0, 8)}`;
const root = path.resolve(__dirname, "..");

function log(message: string) {
  process.stdout.write(`[bench:worker] ${message}\n`);
}

// Invented demo fleet: 8-channel devices (every 5th a 16 MHz / 8 capture timer, the rest echo), half
// the channels on tanks draining slowly, 30 % on bays with cars coming and going, 20 % on fixed
// targets; every 7th channel sends bursts, every 3rd reading carries its own air temperature.
function seedSql(perChannel: number): string {
  return `
    INSERT INTO organisations (name) VALUES ('Bench organisation');
    INSERT INTO sites (organisation_id, name, air_temp_c)
      SELECT o.id, 'Bench site ' || s, 12 + s % 10 FROM organisations o, generate_series(0, 19) s;
    CREATE TEMP TABLE bench_sites AS SELECT id, row_number() OVER (ORDER BY name) - 1 AS n FROM sites;
    INSERT INTO devices (organisation_id, site_id, serial, name, profile, clock_hz, prescaler, timer_bits, expected_interval_s)
      SELECT (SELECT id FROM organisations), (SELECT id FROM bench_sites WHERE n = d % 20), 'BENCH-' || d, 'Bench device ' || d,
             CASE WHEN d % 5 = 0 THEN 'capture'::signal_profile ELSE 'echo'::signal_profile END,
             CASE WHEN d % 5 = 0 THEN 16000000 END, CASE WHEN d % 5 = 0 THEN 8 END, CASE WHEN d % 5 = 0 THEN 16 END, 60
      FROM generate_series(0, ${Math.ceil(channels / 8) - 1}) d;
    CREATE TEMP TABLE bench_devices AS SELECT id, site_id, profile, (substring(serial from 7))::int AS n FROM devices;
    INSERT INTO assets (organisation_id, site_id, kind, name, mount_height_m, capacity_l, geometry, reorder_pct, floor_distance_m, occupied_below_m)
      SELECT (SELECT id FROM organisations), bd.site_id,
             CASE WHEN j % 10 < 5 THEN 'tank'::asset_kind WHEN j % 10 < 8 THEN 'bay'::asset_kind ELSE 'point'::asset_kind END,
             'Bench asset ' || j,
             CASE WHEN j % 10 < 5 THEN 3.0 END,
             CASE WHEN j % 10 < 5 THEN pi() * 2.5 * 1000 END,
             CASE WHEN j % 10 < 5 THEN '{"shape":"vertical_cylinder","diameter_m":2,"height_m":2.5,"bottom":"flat","bottom_depth_m":0}'::jsonb END,
             CASE WHEN j % 10 < 5 THEN 20 END,
             CASE WHEN j % 10 >= 5 AND j % 10 < 8 THEN 2.5 WHEN j % 10 >= 8 THEN 1.5 END,
             CASE WHEN j % 10 >= 5 AND j % 10 < 8 THEN 1.8 END
      FROM generate_series(0, ${channels - 1}) j JOIN bench_devices bd ON bd.n = j / 8;
    INSERT INTO channels (device_id, index, asset_id, max_range_m)
      SELECT bd.id, j % 8, a.id, 4
      FROM generate_series(0, ${channels - 1}) j
      JOIN bench_devices bd ON bd.n = j / 8
      JOIN assets a ON a.name = 'Bench asset ' || j;
    CREATE TEMP TABLE bench_channels AS
      SELECT c.device_id, c.index, bd.profile, (substring(a.name from 13))::int AS j, s.air_temp_c AS temp_c FROM channels c
      JOIN bench_devices bd ON bd.id = c.device_id JOIN assets a ON a.id = c.asset_id JOIN sites s ON s.id = bd.site_id;

    -- One-way distance by asset kind, round-trip time at the site's air temperature (which every third
    -- reading also reports itself), then the profile's encoding.
    WITH g AS (
      SELECT bc.*, k,
             now() - ((${perChannel} - k) * interval '1 minute') + bc.index * interval '80 milliseconds' AS at,
             CASE WHEN bc.j % 10 < 5 THEN 0.5 + 0.001 * k + 0.0015 * (random() - 0.5)
                  WHEN bc.j % 10 < 8 THEN CASE WHEN (k / 60 + bc.j) % 3 = 0 THEN 1.2 ELSE 2.5 END + 0.003 * (random() - 0.5)
                  ELSE 1.5 + 0.002 * (random() - 0.5) END AS distance_m
      FROM bench_channels bc, generate_series(0, ${perChannel - 1}) k
    ), t AS (
      SELECT g.*, 2e6 * distance_m / (331.3 * sqrt(1 + temp_c / 273.15)) AS tof_us FROM g
    ), inserted AS (
      INSERT INTO readings (device_id, channel, seq, at, echo_us, ticks, overflows, samples_us, air_temp_c)
      SELECT device_id, index, k, at,
             CASE WHEN profile = 'echo' AND j % 7 <> 0 THEN round(tof_us::numeric, 1)::float8 END,
             CASE WHEN profile = 'capture' AND j % 7 <> 0 THEN (round(tof_us * 2)::bigint % 65536) END,
             CASE WHEN profile = 'capture' AND j % 7 <> 0 THEN (round(tof_us * 2)::bigint / 65536)::int END,
             CASE WHEN j % 7 = 0 THEN ARRAY[tof_us + 2 * (random() - 0.5), tof_us + 2 * (random() - 0.5), tof_us + 2 * (random() - 0.5), tof_us + 2 * (random() - 0.5), tof_us + 2 * (random() - 0.5)] END,
             CASE WHEN k % 3 = 0 THEN temp_c END
      FROM t
      ${RETURNING_QUEUED_COLUMNS}
    ), ${QUEUE_INSERTED}
    SELECT count(*) FROM queued;
  `;
}

interface Peak {
  rssKb: number;
}

function descendants(pid: number): number[] {
  const out: number[] = [pid];
  for (const entry of fs.readdirSync("/proc")) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      const stat = fs.readFileSync(`/proc/${entry}/stat`, "utf8");
      const ppid = Number(stat.slice(stat.lastIndexOf(")") + 2).split(" ")[1]);
      if (out.includes(ppid)) out.push(Number(entry));
    } catch {
      // The process ended between listing and reading.
    }
  }
  return out;
}

/**
 * Peak resident set (VmHWM) of the process and its children, polled while it runs. VmHWM is the
 * kernel's own high-water mark, so a slow poll loses nothing but the last half second; a fast one
 * (listing every process ten times a second) took CPU from the measured worker.
 */
function watchPeakRss(pid: number, peak: Peak): NodeJS.Timeout {
  return setInterval(() => {
    for (const p of descendants(pid)) {
      try {
        const status = fs.readFileSync(`/proc/${p}/status`, "utf8");
        const hwm = Number(/VmHWM:\s+(\d+)/.exec(status)?.[1] ?? 0);
        peak.rssKb = Math.max(peak.rssKb, hwm);
      } catch {
        // Gone already.
      }
    }
  }, 500);
}

async function main() {
  await ensureBenchPostgres();
  const perChannel = Math.ceil(readingsWanted / channels);
  log(`database ${dbName}: ${channels} channels × ${perChannel} readings`);
  await withClient(adminUrl, (c) => c.query(`CREATE DATABASE ${dbName}`));
  const url = dbUrl(dbName);
  try {
    // A production worker insists on its mail settings (lib/env.ts); the benchmark's readings raise no alarm.
    const mail = { AUTH_SECRET: randomUUID(), SMTP_URL: "smtp://127.0.0.1:9", APP_URL: "http://127.0.0.1:3000" };
    const env: NodeJS.ProcessEnv = { ...process.env, ...mail, DATABASE_URL: url, NODE_ENV: "production", WORKER_QUIET: "0" };
    log(`load average before: ${os.loadavg().map((l) => l.toFixed(2)).join(", ")} on ${os.cpus().length} cores`);
    execFileSync(path.join(root, "node_modules/.bin/tsx"), ["db/migrate.ts", "up"], { cwd: root, env, stdio: "inherit" });
    const seedStart = Date.now();
    await withClient(url, async (c) => {
      await c.query(seedSql(perChannel));
      // The backlog as a worker meets it in service: visible to all (hint bits set) and vacuumed, so
      // autovacuum catching up on a million fresh rows does not run beside the measured worker…
      await c.query("VACUUM ANALYZE");
      // Nor does writing out the seed's dirty pages.
      await c.query("CHECKPOINT");
    });
    const queued = await withClient(url, async (c) => Number((await c.query(`SELECT count(*) AS n FROM reading_queue`)).rows[0].n));
    log(`seeded ${queued} queued readings in ${((Date.now() - seedStart) / 1000).toFixed(1)} s`);

    // The worker as production runs it: bundled by scripts/build-worker.mjs, plain Node.
    execFileSync(process.execPath, ["scripts/build-worker.mjs"], { cwd: root, stdio: "inherit" });
    const workerBundle = path.join(root, ".worker", "worker.cjs");
    const { workerRunEnv } = await import("./lib/worker-env.mjs");
    const peak: Peak = { rssKb: 0 };
    const started = process.hrtime.bigint();
    const child = spawn(process.execPath, [workerBundle, "--once"], { cwd: root, env: workerRunEnv(env), stdio: ["ignore", "pipe", "inherit"] });
    let output = "";
    child.stdout.on("data", (chunk: Buffer) => {
      output += chunk.toString();
      process.stdout.write(chunk);
    });
    const timer = watchPeakRss(child.pid as number, peak);
    const code: number = await new Promise((resolve) => child.on("exit", (c) => resolve(c ?? 1)));
    clearInterval(timer);
    const seconds = Number(process.hrtime.bigint() - started) / 1e9;
    if (code !== 0) throw new Error(`worker exited with ${code}`);

    const check = await withClient(url, async (c) => {
      const q = await c.query(`SELECT (SELECT count(*) FROM reading_queue) AS queue, (SELECT count(*) FROM measurements) AS measurements,
                                      (SELECT count(DISTINCT reading_id) FROM measurements) AS distinct_readings,
                                      (SELECT coalesce(sum(n_all), 0) FROM measurement_rollups WHERE bucket_s = 300) AS rolled,
                                      (SELECT count(*) FROM health_flags) AS flags`);
      const statuses = await c.query(`SELECT status, count(*) AS n FROM measurements GROUP BY status ORDER BY n DESC`);
      return { ...q.rows[0], statuses: statuses.rows.map((r) => `${r.status} ${r.n}`).join(", ") };
    });
    const rate = queued / seconds;
    log(`worker drained ${queued} readings in ${seconds.toFixed(1)} s → ${Math.round(rate).toLocaleString("en-GB")} readings/s (process start included)`);
    // The worker's own account of its first cycle: time spent draining the queue alone.
    const drainMs = Number(/drain (\d+)/.exec(output)?.[1] ?? 0);
    if (drainMs > 0) log(`queue drain alone ${(drainMs / 1000).toFixed(1)} s → ${Math.round(queued / (drainMs / 1000)).toLocaleString("en-GB")} readings/s`);
    log(`load average at the end: ${os.loadavg().map((l) => l.toFixed(2)).join(", ")} on ${os.cpus().length} cores`);
    log(`peak RSS ${(peak.rssKb / 1024).toFixed(0)} MB`);
    log(`check: queue ${check.queue}, measurements ${check.measurements} (${check.distinct_readings} distinct readings), rolled up ${check.rolled}, flags ${check.flags}`);
    log(`statuses: ${check.statuses}`);
    log(`machine: ${os.cpus().length} × ${os.cpus()[0]?.model ?? "cpu"}, ${(os.totalmem() / 2 ** 30).toFixed(0)} GiB, Node ${process.version}`);
    log(rate >= 50_000 && peak.rssKb <= 300 * 1024 ? "target met (≥ 50,000 readings/s, ≤ 300 MB)" : "target NOT met (≥ 50,000 readings/s, ≤ 300 MB)");
  } finally {
    if (!keep) await withClient(adminUrl, (c) => c.query(`DROP DATABASE IF EXISTS ${dbName} WITH (FORCE)`));
    else log(`kept database ${dbName}`);
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
