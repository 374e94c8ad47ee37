// npm run ops:restore-drill — backs up the local cluster with pg_basebackup (tar format, WAL streamed
// into the backup), restores it into a new cluster on a free port as docs/operations.md describes,
// and compares the row count of every table and the latest measurement of every channel between the
// two. The last line says PASS or FAIL. Compared: the `halftrip` database of `npm start`
// (DRILL_DATABASE names another); where it does not exist, a database of the drill's own, migrated,
// seeded with the demo scenario plus a day of invented readings on its echo channels, and measured by
// the worker. The source should be idle while the drill runs (a write after the backup's end shows as
// a difference). Everything the drill made is removed at the end, its own database too.
import { execFileSync, spawnSync } from "node:child_process";
import { randomBytes } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { dropDatabase, ensureDatabase, PG_PORT, psql, startPostgres } from "./lib/postgres.mjs";
import { freePort } from "./lib/processes.mjs";
import { psqlAt } from "./lib/scale-stack.mjs";
import { log } from "./lib/system.mjs";

const root = path.resolve(import.meta.dirname, "..");
const requested = process.env.DRILL_DATABASE ?? "halftrip";
const bin = (name) => path.join(root, "node_modules", ".bin", name);

function runAsPostgres(pgBin, args) {
  const isRoot = process.getuid?.() === 0;
  return spawnSync(isRoot ? "runuser" : pgBin, isRoot ? ["-u", "postgres", "--", pgBin, ...args] : args, { encoding: "utf8", cwd: "/" });
}

function asPostgres(pgBin, args) {
  const r = runAsPostgres(pgBin, args);
  if (r.status !== 0) throw new Error(`${path.basename(pgBin)} failed: ${r.stderr || r.stdout}`);
  return r.stdout;
}

/** Row counts of every table of the public schema, and each channel's latest measurement, as text lines. */
function snapshot(query) {
  const tables = query(`SELECT tablename FROM pg_tables WHERE schemaname = 'public' ORDER BY tablename`).split("\n").filter(Boolean);
  const counts = tables.map((t) => `${t} ${query(`SELECT count(*) FROM "${t}"`)}`);
  const latest = query(
    `SELECT DISTINCT ON (channel_id) channel_id || ' ' || at || ' ' || reading_id || ' ' || status || ' ' || coalesce(distance_m::text, '-')
     FROM measurements WHERE channel_id IS NOT NULL ORDER BY channel_id, at DESC, reading_id DESC`,
  ).split("\n").filter(Boolean);
  return { counts, latest };
}

const pgBin = startPostgres();
const tag = randomBytes(4).toString("hex");
const ownDatabase = !psql(`SELECT 1 FROM pg_database WHERE datname = '${requested.replace(/'/g, "")}'`);
const database = ownDatabase ? `halftrip_drill_${tag}` : requested;
const work = path.join(root, ".data", `restore-drill-${tag}`);
const backupDir = path.join(work, "backup");
const restoredDir = path.join(work, "restored");
let restoredStarted = false;
let passed = false;
process.on("exit", () => {
  if (restoredStarted) runAsPostgres(path.join(pgBin, "pg_ctl"), ["-D", restoredDir, "-m", "immediate", "-w", "stop"]);
  fs.rmSync(work, { recursive: true, force: true });
  if (ownDatabase) try { dropDatabase(database); } catch { /* the server may be gone */ }
});
setTimeout(() => { log("restore drill ran past 15 minutes: stopping"); process.exit(1); }, 15 * 60_000).unref();

try {
  fs.mkdirSync(work, { recursive: true });
  if (ownDatabase) {
    log(`no ${requested} database: the drill makes ${database}, with the demo scenario and a day of readings`);
    const env = { ...process.env, DATABASE_URL: ensureDatabase(database) };
    execFileSync(bin("tsx"), ["db/migrate.ts", "up"], { cwd: root, env, stdio: "inherit" });
    execFileSync(bin("tsx"), ["db/seed.ts"], { cwd: root, env: { ...env, DEMO_KEYS_FILE: path.join(work, "demo-device-keys.json") }, stdio: "inherit" });
    // One reading every 10 minutes for a day on every echo channel, queued as the ingest queues them.
    psql(
      `WITH r AS (
         INSERT INTO readings (device_id, channel, seq, at, echo_us)
         SELECT c.device_id, c.index, g, now() - g * interval '10 minutes', 5000 + 20 * g + 100 * c.index
         FROM channels c JOIN devices d ON d.id = c.device_id AND d.profile = 'echo', generate_series(1, 144) g
         RETURNING id, at, device_id, channel, echo_us)
       INSERT INTO reading_queue (reading_id, at, device_id, channel, echo_us) SELECT id, at, device_id, channel, echo_us FROM r`,
      database,
    );
    execFileSync(bin("tsx"), ["workers/worker.ts", "--once"], { cwd: root, env: { ...env, WORKER_QUIET: "1", AUTH_SECRET: randomBytes(16).toString("hex") }, stdio: "inherit" });
  }
  if (process.getuid?.() === 0) spawnSync("chown", ["-R", "postgres:postgres", work]);
  fs.chmodSync(work, 0o700);

  // 1. The base backup: tar format, with the WAL written during the backup streamed into it.
  const started = Date.now();
  asPostgres(path.join(pgBin, "pg_basebackup"), ["-h", "127.0.0.1", "-p", String(PG_PORT), "-U", "postgres", "-D", backupDir, "-F", "t", "-X", "stream", "-c", "fast", "--manifest-checksums=SHA256"]);
  const source = snapshot((sql) => psql(sql, database));
  log(`base backup in ${((Date.now() - started) / 1000).toFixed(1)} s: ${fs.readdirSync(backupDir).join(", ")}`);

  // 2. The restore: a new data folder from the tar files, checked against the backup's manifest, started on its own port.
  fs.mkdirSync(path.join(restoredDir, "pg_wal"), { recursive: true, mode: 0o700 });
  execFileSync("tar", ["-xf", path.join(backupDir, "base.tar"), "-C", restoredDir]);
  execFileSync("tar", ["-xf", path.join(backupDir, "pg_wal.tar"), "-C", path.join(restoredDir, "pg_wal")]);
  if (process.getuid?.() === 0) spawnSync("chown", ["-R", "postgres:postgres", work]);
  fs.chmodSync(restoredDir, 0o700);
  asPostgres(path.join(pgBin, "pg_verifybackup"), ["-m", path.join(backupDir, "backup_manifest"), "-n", restoredDir]);
  const port = await freePort();
  const socketDir = path.join(work, "socket");
  fs.mkdirSync(socketDir);
  if (process.getuid?.() === 0) spawnSync("chown", ["postgres:postgres", socketDir]);
  asPostgres(path.join(pgBin, "pg_ctl"), ["-D", restoredDir, "-l", path.join(work, "restored.log"), "-w", "-t", "120", "-o", `-c listen_addresses=127.0.0.1 -p ${port} -k ${socketDir}`, "start"]);
  restoredStarted = true;
  log(`restored cluster up on 127.0.0.1:${port}`);

  // 3. The comparison.
  const restored = snapshot((sql) => psqlAt(port, sql, database));
  const differ = (a, b) => a.filter((x, i) => x !== b[i]).concat(b.slice(a.length));
  const countDiffs = differ(source.counts, restored.counts);
  const latestDiffs = differ(source.latest, restored.latest);
  const rows = source.counts.reduce((s, line) => s + Number(line.split(" ")[1]), 0);
  for (const d of countDiffs.slice(0, 10)) log(`row count differs: source "${d}"`);
  for (const d of latestDiffs.slice(0, 10)) log(`latest measurement differs: source "${d}"`);
  passed = countDiffs.length === 0 && latestDiffs.length === 0 && source.counts.length === restored.counts.length && source.latest.length === restored.latest.length;
  process.stdout.write(
    `restore drill ${passed ? "PASS" : "FAIL"}: ${database}, ${source.counts.length} tables (${rows} rows) and the latest measurement of ${source.latest.length} channels ${passed ? "identical" : `differ (${countDiffs.length} tables, ${latestDiffs.length} channels)`} after pg_basebackup and restore into a new cluster\n`,
  );
} catch (err) {
  log(err.stack ?? err.message);
  process.stdout.write(`restore drill FAIL: ${err.message.split("\n")[0]}\n`);
}
process.exit(passed ? 0 : 1);
