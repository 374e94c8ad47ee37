// One entry point for `npm start`, `npm run dev` and `npm test`: installs what is missing, starts
// PostgreSQL and the mail sink, builds when sources changed, migrates, seeds and runs the product.
// Plain Node with no dependencies, because it runs before `npm ci`.
import { randomBytes, randomUUID } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { dropDatabase, ensureDatabase, PG_PORT, startPostgres, stopPostgres, psql } from "./lib/postgres.mjs";
import { ensureChromium, log } from "./lib/system.mjs";
import { buildIfChanged } from "./lib/next-build.mjs";
import { freePort, run, runOrDie, startService, stopServices, waitForUrl } from "./lib/processes.mjs";

const root = path.resolve(import.meta.dirname, "..");
process.chdir(root);
const mode = process.argv[2] ?? "start";
const bin = (name) => path.join(root, "node_modules", ".bin", name);
const dataDir = path.join(root, ".data");
fs.mkdirSync(dataDir, { recursive: true });

function ensureNodeModules() {
  const marker = path.join(root, "node_modules", ".package-lock.json");
  const lock = path.join(root, "package-lock.json");
  if (fs.existsSync(marker) && fs.statSync(marker).mtimeMs >= fs.statSync(lock).mtimeMs) return;
  log("installing npm packages (npm ci)");
  runOrDie("npm", ["ci", "--no-audit", "--no-fund"], { env: { ...process.env, PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD: "1" } });
}

function authSecret() {
  if (process.env.AUTH_SECRET) return process.env.AUTH_SECRET;
  const file = path.join(dataDir, "auth-secret");
  if (!fs.existsSync(file)) fs.writeFileSync(file, randomBytes(32).toString("base64url"), { mode: 0o600 });
  return fs.readFileSync(file, "utf8").trim();
}

function migrateAndSeed(env) {
  runOrDie(bin("tsx"), ["db/migrate.ts", "up"], { env });
  runOrDie(bin("tsx"), ["db/seed.ts"], { env });
}

function baseEnv({ databaseUrl, port, smtpPort, sinkHttpPort }) {
  return {
    ...process.env,
    DATABASE_URL: databaseUrl,
    AUTH_SECRET: authSecret(),
    AUTH_TRUST_HOST: "1",
    PORT: String(port),
    SMTP_URL: process.env.SMTP_URL ?? `smtp://127.0.0.1:${smtpPort}`,
    SMTP_SINK_PORT: String(smtpPort),
    SMTP_SINK_HTTP_PORT: String(sinkHttpPort),
    MAIL_SINK_URL: `http://127.0.0.1:${sinkHttpPort}`,
    // This stack runs the mail sink itself on 127.0.0.1, so its Mail sink page may exist under `next start` too.
    HALFTRIP_LOCAL_STACK: "1",
    APP_URL: process.env.APP_URL ?? `http://127.0.0.1:${port}`,
    NEXT_TELEMETRY_DISABLED: "1",
  };
}

function postgresWasRunning() {
  try { psql("SELECT 1"); return true; } catch { return false; }
}

function startSink(env) {
  startService("mail", bin("tsx"), ["workers/smtp-sink.ts"], { env });
  return waitForUrl(`${env.MAIL_SINK_URL}/health`, 30000);
}

function startBackground(env, dev) {
  if (fs.existsSync(path.join(root, "workers", "stack-services.mjs"))) {
    return import("../workers/stack-services.mjs").then((m) => m.startBackgroundServices({ env, startService, bin, dev }));
  }
}

async function serve(dev) {
  ensureNodeModules();
  const pgAlready = postgresWasRunning();
  startPostgres();
  const port = Number(process.env.PORT ?? 3000);
  const env = baseEnv({ databaseUrl: process.env.DATABASE_URL ?? ensureDatabase("halftrip"), port, smtpPort: 2525, sinkHttpPort: 2580 });
  let stopping = false;
  const shutdown = async () => {
    if (stopping) return;
    stopping = true;
    log("stopping…");
    await stopServices();
    if (!pgAlready) stopPostgres();
    process.exit(0);
  };
  process.on("SIGINT", shutdown);
  process.on("SIGTERM", shutdown);
  if (!dev) buildIfChanged({ ...env, NODE_ENV: "production" });
  migrateAndSeed(env);
  await startSink(env);
  startService("web", bin("next"), dev ? ["dev", "-p", String(port)] : ["start", "-p", String(port)], { env: { ...env, NODE_ENV: dev ? "development" : "production" } });
  await waitForUrl(`http://127.0.0.1:${port}/api/health`, 120000);
  await startBackground(env, dev);
  log(`Halftrip is running at http://127.0.0.1:${port}`);
  log("demo accounts (password demo-tanks-and-bays): admin@halftrip.test, operator@halftrip.test, technician@halftrip.test, viewer@halftrip.test");
  log(`mail sink: ${env.MAIL_SINK_URL}/messages (also the Mail sink page for admins) · Ctrl-C stops everything`);
}

// A private stack for one developer's API tests: its own database, ports and Next dist folder, with
// `next dev` (no build). Writes .data/sandbox-<name>.env to source before running vitest files.
async function sandbox(name, port) {
  if (!/^[a-z0-9]+$/.test(name)) throw new Error("sandbox name: lower-case letters and digits");
  ensureNodeModules();
  startPostgres();
  const env = {
    ...baseEnv({ databaseUrl: ensureDatabase(`halftrip_${name}`), port, smtpPort: port + 1, sinkHttpPort: port + 2 }),
    TEST_BASE_URL: `http://127.0.0.1:${port}`,
    PG_ADMIN_URL: `postgres://postgres@127.0.0.1:${PG_PORT}/postgres`,
    NEXT_DIST_DIR: `.next-${name}`,
    HALFTRIP_TEST: "1",
  };
  const shutdown = async () => { await stopServices(); process.exit(0); };
  process.on("SIGINT", shutdown);
  process.on("SIGTERM", shutdown);
  migrateAndSeed(env);
  await startSink(env);
  startService("web", bin("next"), ["dev", "-p", String(port)], { env: { ...env, NODE_ENV: "development" } });
  await waitForUrl(`${env.TEST_BASE_URL}/api/health`, 180000);
  const keys = ["DATABASE_URL", "AUTH_SECRET", "TEST_BASE_URL", "MAIL_SINK_URL", "SMTP_URL", "PG_ADMIN_URL", "APP_URL", "HALFTRIP_TEST", "HALFTRIP_LOCAL_STACK"];
  const file = path.join(dataDir, `sandbox-${name}.env`);
  fs.writeFileSync(file, keys.map((k) => `${k}=${env[k]}`).join("\n") + "\n");
  log(`sandbox ${name} ready at ${env.TEST_BASE_URL}; env in ${path.relative(root, file)}`);
}

function readJson(file) {
  try { return JSON.parse(fs.readFileSync(file, "utf8")); } catch { return null; }
}

async function test() {
  const started = Date.now();
  ensureNodeModules();
  const results = { passed: 0, failed: 0, skipped: 0 };
  const check = (name, status) => {
    log(`${name}: ${status === 0 ? "clean" : "FAILED"}`);
    if (status === 0) results.passed += 1; else results.failed += 1;
  };
  check("lint", run(bin("eslint"), [".", "--max-warnings=0"]));
  check("typecheck", run(bin("tsc"), ["--noEmit", "-p", "tsconfig.json"]));

  const pgAlready = postgresWasRunning();
  startPostgres();
  const dbName = `halftrip_test_${randomUUID().slice(0, 8)}`;
  const port = Number(process.env.TEST_PORT ?? (await freePort()));
  const env = {
    ...baseEnv({ databaseUrl: ensureDatabase(dbName), port, smtpPort: await freePort(), sinkHttpPort: await freePort() }),
    TEST_BASE_URL: `http://127.0.0.1:${port}`,
    PG_ADMIN_URL: `postgres://postgres@127.0.0.1:${PG_PORT}/postgres`,
    HALFTRIP_TEST: "1",
    DEMO_KEYS_FILE: path.join(dataDir, "test-results", "demo-device-keys.json"),
  };
  const resultsDir = path.join(dataDir, "test-results");
  fs.rmSync(resultsDir, { recursive: true, force: true });
  fs.mkdirSync(resultsDir, { recursive: true });
  let exitCode = 1;
  try {
    buildIfChanged({ ...env, NODE_ENV: "production" });
    migrateAndSeed(env);
    await startSink(env);
    startService("web", bin("next"), ["start", "-p", String(port)], { env: { ...env, NODE_ENV: "production" }, silent: true });
    await waitForUrl(`${env.TEST_BASE_URL}/api/health`, 120000);

    const vitestJson = path.join(resultsDir, "vitest.json");
    run(bin("vitest"), ["run", "--reporter=default", "--reporter=json", `--outputFile.json=${vitestJson}`], { env });
    const v = readJson(vitestJson);
    if (v) {
      results.passed += v.numPassedTests; results.failed += v.numFailedTests + countFilesFailedWithoutTests(v);
      results.skipped += (v.numPendingTests ?? 0) + (v.numTodoTests ?? 0);
    } else {
      log("vitest wrote no results"); results.failed += 1;
    }

    const chromium = ensureChromium();
    const pwJson = path.join(resultsDir, "playwright.json");
    run(bin("playwright"), ["test", "--reporter=list,json"], { env: { ...env, CHROMIUM_PATH: chromium, PLAYWRIGHT_JSON_OUTPUT_NAME: pwJson } });
    const p = readJson(pwJson);
    if (p?.stats) {
      results.passed += p.stats.expected; results.failed += p.stats.unexpected + (p.stats.flaky ?? 0); results.skipped += p.stats.skipped;
      if (p.errors?.length) results.failed += p.errors.length;
    } else {
      log("playwright wrote no results"); results.failed += 1;
    }
    exitCode = results.failed === 0 ? 0 : 1;
  } catch (err) {
    log(`test set-up failed: ${err.message}`);
    results.failed += 1;
  } finally {
    await stopServices();
    try { dropDatabase(dbName); } catch (err) { log(`could not drop ${dbName}: ${err.message}`); }
    if (!pgAlready) stopPostgres();
  }
  log(`finished in ${Math.round((Date.now() - started) / 1000)} s`);
  process.stdout.write(`${results.passed} passed, ${results.failed} failed${results.skipped ? `, ${results.skipped} skipped` : ""}\n`);
  process.exit(exitCode);
}

// A test file that fails to load has no failed tests of its own; count it once so it cannot pass silently.
function countFilesFailedWithoutTests(v) {
  return (v.testResults ?? []).filter((s) => s.status === "failed" && !(s.assertionResults ?? []).some((a) => a.status === "failed")).length;
}

if (mode === "test") await test();
else if (mode === "dev") await serve(true);
else if (mode === "start") await serve(false);
else if (mode === "sandbox") {
  await sandbox(process.argv[3] ?? "dev1", Number(process.argv[4] ?? 3200));
} else if (mode === "migrate" || mode === "seed") {
  ensureNodeModules();
  startPostgres();
  const env = baseEnv({ databaseUrl: process.env.DATABASE_URL ?? ensureDatabase("halftrip"), port: 3000, smtpPort: 2525, sinkHttpPort: 2580 });
  runOrDie(bin("tsx"), [mode === "migrate" ? "db/migrate.ts" : "db/seed.ts", ...process.argv.slice(3)], { env });
} else if (mode === "db:stop") stopPostgres();
else {
  console.error(`unknown mode ${mode}: use start, dev, test, migrate, seed or db:stop`);
  process.exit(2);
}
