// Worker benchmark (`npm run bench:worker`): a fresh database with 2,000 channels and a backlog of
// 1,000,000 queued readings generated in SQL, copied once (the same backlog twice). ONE worker
// (`workers/worker.ts --once`, bundled as production runs it, a child process) drains the first copy;
// then, in that database, ONE set-based INSERT … SELECT of the same arithmetic (scripts/bench/worker-anchor.ts)
// measures the same readings again as the anchor; then TWO workers drain the second copy together.
// Prints every rate, the worker's rate as a ratio to the anchor's and two workers' to one's, peak RSS,
// and checks that every reading got exactly one measurement and the anchor the worker's distances.
// Targets (issue 11): ratio ≥ 0.35 with peak RSS ≤ 300 MB; two workers ≥ 1.3× one. The last line is
// one JSON object with the figures.
//
// Options: BENCH_READINGS (default 1000000), BENCH_CHANNELS (2000), WORKER_BATCH_SIZE, --keep (leave the database).
// A/B: BENCH_AB=a.cjs,b.cjs (worker bundles built beforehand) and BENCH_ROUNDS (3) run one worker of
// each bundle in turn, each on a fresh copy of the same seeded backlog, and print every rate (no anchor).
import { spawn } from "node:child_process";
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { execFileSync } from "node:child_process";
import { adminUrl, dbUrl, ensureBenchPostgres, withClient } from "./bench/pg";
import { checkAnchor, runAnchor } from "./bench/worker-anchor";
import { postmasterPid, serverCpuSeconds } from "./bench/pg-cpu";
import { QUEUE_INSERTED, RETURNING_QUEUED_COLUMNS } from "../lib/worker/reading-queue";

const readingsWanted = Number(process.env.BENCH_READINGS ?? 1_000_000);
const channels = Number(process.env.BENCH_CHANNELS ?? 2000);
const keep = process.argv.includes("--keep");
const dbName = `halftrip_bench_worker_${randomUUID().slice(0, 8)}`;
// The same backlog again, for two workers.
const twinName = `${dbName}_twin`;
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
  /** CPU seconds (user + system) of the process and its children at the last poll. */
  cpuS: number;
}

const CLOCK_TICKS = 100; // USER_HZ on Linux (sysconf(_SC_CLK_TCK))

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
    let ticks = 0;
    for (const p of descendants(pid)) {
      try {
        const status = fs.readFileSync(`/proc/${p}/status`, "utf8");
        const hwm = Number(/VmHWM:\s+(\d+)/.exec(status)?.[1] ?? 0);
        peak.rssKb = Math.max(peak.rssKb, hwm);
        // utime and stime, fields 14 and 15 of /proc/<pid>/stat (proc(5)).
        const raw = fs.readFileSync(`/proc/${p}/stat`, "utf8");
        const stat = raw.slice(raw.lastIndexOf(")") + 2).split(" ");
        ticks += Number(stat[11]) + Number(stat[12]);
      } catch {
        // Gone already.
      }
    }
    peak.cpuS = Math.max(peak.cpuS, ticks / CLOCK_TICKS);
  }, 500);
}

interface WorkerRun {
  seconds: number;
  /** The workers' own account of their first cycle's queue drain, ms each. */
  drainMs: number[];
  peakRssKb: number[];
  /** CPU seconds of each worker, as last polled (up to half a second before it exited). */
  cpuS: number[];
  /** CPU seconds the PostgreSQL server (all its processes) used meanwhile. */
  serverCpuS: number;
}

/** Starts `count` bundled workers with `--once` on one database and waits until all have exited. */
async function runWorkers(count: number, workerBundle: string, env: NodeJS.ProcessEnv, postmaster: number): Promise<WorkerRun> {
  const serverBefore = serverCpuSeconds(postmaster);
  const started = process.hrtime.bigint();
  const runs = Array.from({ length: count }, async (_, i) => {
    const peak: Peak = { rssKb: 0, cpuS: 0 };
    const child = spawn(process.execPath, [workerBundle, "--once"], { cwd: root, env, stdio: ["ignore", "pipe", "inherit"] });
    let output = "";
    child.stdout.on("data", (chunk: Buffer) => {
      output += chunk.toString();
      process.stdout.write(count > 1 ? chunk.toString().replace(/^(?=.)/gm, `[worker ${i + 1}] `) : chunk);
    });
    const timer = watchPeakRss(child.pid as number, peak);
    const code: number = await new Promise((resolve) => child.on("exit", (c) => resolve(c ?? 1)));
    clearInterval(timer);
    if (code !== 0) throw new Error(`worker ${i + 1} exited with ${code}`);
    return { drainMs: Number(/drain (\d+)/.exec(output)?.[1] ?? 0), rssKb: peak.rssKb, cpuS: peak.cpuS };
  });
  const done = await Promise.all(runs);
  const seconds = Number(process.hrtime.bigint() - started) / 1e9;
  await settle();
  return { seconds, drainMs: done.map((d) => d.drainMs), peakRssKb: done.map((d) => d.rssKb), cpuS: done.map((d) => d.cpuS), serverCpuS: serverCpuSeconds(postmaster) - serverBefore };
}

/** Every queued reading measured exactly once, and the rollups counting them all. */
async function checkDrained(url: string, queued: number): Promise<string> {
  return withClient(url, async (c) => {
    const q = await c.query(`SELECT (SELECT count(*) FROM reading_queue) AS queue, (SELECT count(*) FROM measurements) AS measurements,
                                    (SELECT count(DISTINCT reading_id) FROM measurements) AS distinct_readings,
                                    (SELECT coalesce(sum(n_all), 0) FROM measurement_rollups WHERE bucket_s = 300) AS rolled,
                                    (SELECT count(*) FROM health_flags) AS flags`);
    const r = q.rows[0];
    const statuses = await c.query(`SELECT status, count(*) AS n FROM measurements GROUP BY status ORDER BY n DESC`);
    if (Number(r.queue) !== 0 || Number(r.measurements) !== queued || Number(r.distinct_readings) !== queued || Number(r.rolled) !== queued) {
      throw new Error(`not every reading measured exactly once: queue ${r.queue}, measurements ${r.measurements} (${r.distinct_readings} distinct), rolled up ${r.rolled} of ${queued}`);
    }
    return `queue ${r.queue}, measurements ${r.measurements} (${r.distinct_readings} distinct readings), rolled up ${r.rolled}, flags ${r.flags}; statuses: ${statuses.rows.map((s) => `${s.status} ${s.n}`).join(", ")}`;
  });
}

const perSecond = (n: number, seconds: number) => Math.round(n / seconds);
/** Lets the backends of connections just closed exit and be reaped, so their CPU time is counted. */
const settle = () => new Promise((resolve) => setTimeout(resolve, 1000));

/** Where a run's CPU went: the workers', the server's, and how many cores that kept busy on average. */
function cpuAccount(label: string, run: WorkerRun, readings: number): string {
  const workers = run.cpuS.reduce((a, b) => a + b, 0);
  const total = workers + run.serverCpuS;
  return (
    `${label}: CPU ${workers.toFixed(1)} s worker${run.cpuS.length > 1 ? "s" : ""} + ${run.serverCpuS.toFixed(1)} s PostgreSQL = ${total.toFixed(1)} s in ${run.seconds.toFixed(1)} s ` +
    `(${(total / run.seconds).toFixed(2)} cores busy; ${((workers * 1e6) / readings).toFixed(1)} + ${((run.serverCpuS * 1e6) / readings).toFixed(1)} µs a reading)`
  );
}

/** The drain rate if every core did nothing but what one worker and the server spend per reading. */
function cpuBound(run: WorkerRun, readings: number, cores: number): { microsPerReading: number; rate: number; times: number } {
  const microsPerReading = ((run.cpuS[0] + run.serverCpuS) * 1e6) / readings;
  const rate = Math.round((cores * 1e6) / microsPerReading);
  return { microsPerReading, rate, times: Math.round((rate / perSecond(readings, run.seconds)) * 100) / 100 };
}
const fmt = (n: number) => n.toLocaleString("en-GB");
const mb = (kb: number) => Math.round(kb / 1024);
const loadAverage = () => os.loadavg().map((l) => l.toFixed(2)).join(", ");

/** A/B: one worker of each bundle in turn, each on its own file copy of the twin (the untouched backlog). */
async function compareBundles(bundles: string[], queued: number, runEnv: (e: NodeJS.ProcessEnv) => NodeJS.ProcessEnv, env: NodeJS.ProcessEnv, postmaster: number): Promise<void> {
  const rounds = Number(process.env.BENCH_ROUNDS ?? 3);
  const rates = new Map<string, number[]>(bundles.map((b) => [b, []]));
  const cpu = new Map<string, number[]>(bundles.map((b) => [b, []]));
  for (let round = 1; round <= rounds; round++) {
    for (const bundle of bundles) {
      const copy = `${dbName}_ab`;
      await withClient(adminUrl, async (c) => {
        await c.query(`DROP DATABASE IF EXISTS ${copy} WITH (FORCE)`);
        await c.query(`CREATE DATABASE ${copy} TEMPLATE ${twinName} STRATEGY FILE_COPY`);
        await c.query("CHECKPOINT");
      });
      const run = await runWorkers(1, path.resolve(bundle), runEnv({ ...env, DATABASE_URL: dbUrl(copy), WORKER_QUIET: "1" }), postmaster);
      await checkDrained(dbUrl(copy), queued);
      await withClient(adminUrl, (c) => c.query(`DROP DATABASE ${copy} WITH (FORCE)`));
      rates.get(bundle)!.push(perSecond(queued, run.seconds));
      cpu.get(bundle)!.push(run.cpuS[0]);
      log(`round ${round} ${bundle}: ${fmt(perSecond(queued, run.seconds))} readings/s, worker CPU ${run.cpuS[0].toFixed(1)} s, PostgreSQL CPU ${run.serverCpuS.toFixed(1)} s, peak RSS ${mb(run.peakRssKb[0])} MB, load ${loadAverage()}`);
    }
  }
  const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[xs.length >> 1];
  for (const [bundle, r] of rates) {
    const c = cpu.get(bundle)!;
    log(`${bundle}: ${r.map(fmt).join(", ")} readings/s (median ${fmt(median(r))}); worker CPU ${c.map((x) => x.toFixed(1)).join(", ")} s (median ${median(c).toFixed(1)})`);
  }
}

async function main() {
  await ensureBenchPostgres();
  const perChannel = Math.ceil(readingsWanted / channels);
  log(`database ${dbName}: ${channels} channels × ${perChannel} readings`);
  await withClient(adminUrl, (c) => c.query(`CREATE DATABASE ${dbName}`));
  const url = dbUrl(dbName);
  const twinUrl = dbUrl(twinName);
  try {
    // A production worker insists on its mail settings (lib/env.ts); the benchmark's readings raise no alarm.
    const mail = { AUTH_SECRET: randomUUID(), SMTP_URL: "smtp://127.0.0.1:9", APP_URL: "http://127.0.0.1:3000" };
    const env: NodeJS.ProcessEnv = { ...process.env, ...mail, DATABASE_URL: url, NODE_ENV: "production", WORKER_QUIET: "0" };
    const loadBefore = os.loadavg()[0];
    log(`load average before: ${loadAverage()} on ${os.cpus().length} cores`);
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
    // The same backlog for the two workers: a file copy of the seeded database (no connection to it may be open).
    await withClient(adminUrl, async (c) => {
      await c.query(`CREATE DATABASE ${twinName} TEMPLATE ${dbName} STRATEGY FILE_COPY`);
      await c.query("CHECKPOINT");
    });
    log(`seeded ${queued} queued readings (and a copy) in ${((Date.now() - seedStart) / 1000).toFixed(1)} s`);

    const { workerRunEnv } = await import("./lib/worker-env.mjs");
    const postmaster = await withClient(adminUrl, postmasterPid);
    if (process.env.BENCH_AB) {
      await compareBundles(process.env.BENCH_AB.split(","), queued, workerRunEnv, env, postmaster);
      return;
    }
    // The worker as production runs it: bundled by scripts/build-worker.mjs, plain Node.
    execFileSync(process.execPath, ["scripts/build-worker.mjs"], { cwd: root, stdio: "inherit" });
    const workerBundle = path.join(root, ".worker", "worker.cjs");

    const one = await runWorkers(1, workerBundle, workerRunEnv(env), postmaster);
    const rate1 = perSecond(queued, one.seconds);
    log(`1 worker drained ${queued} readings in ${one.seconds.toFixed(1)} s → ${fmt(rate1)} readings/s (process start included)`);
    if (one.drainMs[0] > 0) log(`1 worker: queue drain alone ${(one.drainMs[0] / 1000).toFixed(1)} s → ${fmt(perSecond(queued, one.drainMs[0] / 1000))} readings/s`);
    log(`1 worker: peak RSS ${mb(one.peakRssKb[0])} MB, CPU ${one.cpuS[0].toFixed(1)} s`);
    log(cpuAccount("1 worker", one, queued));
    log(`1 worker check: ${await checkDrained(url, queued)}`);

    const anchorServerBefore = serverCpuSeconds(postmaster);
    const anchor = await withClient(url, runAnchor);
    await settle();
    const anchorServerCpuS = serverCpuSeconds(postmaster) - anchorServerBefore;
    const anchorRate = perSecond(anchor.rows, anchor.seconds);
    log(`anchor INSERT … SELECT: ${anchor.rows} rows in ${anchor.seconds.toFixed(1)} s → ${fmt(anchorRate)} rows/s (PostgreSQL CPU ${anchorServerCpuS.toFixed(1)} s)`);
    const agree = await withClient(url, checkAnchor);
    log(
      `anchor check on ${agree.compared} distances: max |Δ| distance ${agree.maxDistanceDiffM.toExponential(2)} m, level ${agree.maxLevelDiffM.toExponential(2)} m, ` +
        `volume ${agree.maxVolumeDiffL.toExponential(2)} L; statuses agree ${agree.statusAgreePct.toFixed(2)} %, bays' occupancy ${agree.occupiedAgreePct.toFixed(2)} % of ${agree.bayCompared} (the worker debounces)`,
    );
    if (!(agree.maxDistanceDiffM <= 1e-6) || !(agree.maxLevelDiffM <= 1e-6) || !(agree.maxVolumeDiffL <= 1e-3) || agree.compared === 0) {
      throw new Error("the anchor does not compute the worker's distances, levels and volumes");
    }

    const two = await runWorkers(2, workerBundle, workerRunEnv({ ...env, DATABASE_URL: twinUrl }), postmaster);
    const rate2 = perSecond(queued, two.seconds);
    log(`2 workers drained ${queued} readings in ${two.seconds.toFixed(1)} s → ${fmt(rate2)} readings/s (process start included)`);
    log(`2 workers: peak RSS ${two.peakRssKb.map(mb).join(" MB, ")} MB, CPU ${two.cpuS.map((x) => x.toFixed(1)).join(" s, ")} s`);
    log(cpuAccount("2 workers", two, queued));
    log(`2 workers check: ${await checkDrained(twinUrl, queued)}`);

    const ratio = Math.round((rate1 / anchorRate) * 1000) / 1000;
    const scaling = Math.round((rate2 / rate1) * 100) / 100;
    const rssMb = Math.max(...one.peakRssKb, ...two.peakRssKb) / 1024;
    log(`load average at the end: ${loadAverage()} on ${os.cpus().length} cores`);
    log(`machine: ${os.cpus().length} × ${os.cpus()[0]?.model ?? "cpu"}, ${(os.totalmem() / 2 ** 30).toFixed(0)} GiB, Node ${process.version}`);
    log(`worker ÷ anchor: ${ratio} (target ≥ 0.35) — ${ratio >= 0.35 ? "met" : "NOT met"}; peak RSS ${Math.round(rssMb)} MB (target ≤ 300) — ${rssMb <= 300 ? "met" : "NOT met"}`);
    log(`2 workers ÷ 1: ${scaling}× (target ≥ 1.3×) — ${scaling >= 1.3 ? "met" : "NOT met"}`);
    const bound = cpuBound(one, queued, os.cpus().length);
    log(`CPU bound: one worker and PostgreSQL use ${fmt(Math.round(bound.microsPerReading * 10) / 10)} µs of CPU a reading; ${os.cpus().length} cores busy all the time would drain ${fmt(bound.rate)} readings/s = ${bound.times}× one worker`);
    process.stdout.write(
      JSON.stringify({
        ratio,
        worker_readings_per_s: { "1": rate1, "2": rate2 },
        two_workers_vs_one: scaling,
        anchor_rows_per_s: anchorRate,
        peak_rss_mb: { "1": mb(one.peakRssKb[0]), "2": two.peakRssKb.map(mb) },
        worker_cpu_s: { "1": Math.round(one.cpuS[0] * 10) / 10, "2": two.cpuS.map((x) => Math.round(x * 10) / 10) },
        postgres_cpu_s: { "1": Math.round(one.serverCpuS * 10) / 10, "2": Math.round(two.serverCpuS * 10) / 10, anchor: Math.round(anchorServerCpuS * 10) / 10 },
        cpu_bound_readings_per_s: bound.rate,
        load_average: { before: Math.round(loadBefore * 100) / 100, after: Math.round(os.loadavg()[0] * 100) / 100 },
      }) + "\n",
    );
  } finally {
    if (!keep) {
      await withClient(adminUrl, async (c) => {
        await c.query(`DROP DATABASE IF EXISTS ${dbName} WITH (FORCE)`);
        await c.query(`DROP DATABASE IF EXISTS ${twinName} WITH (FORCE)`);
      });
    } else process.stderr.write(`[bench:worker] kept databases ${dbName} and ${twinName}\n`);
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
