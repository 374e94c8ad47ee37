// npm run test:scale — the cross-instance tests (tests/scale/) against the scale stack of
// scripts/lib/scale-stack.mjs: two web instances behind HAProxy, a streaming replica, bundled workers.
// Ends with `N passed, N failed` like `npm test`; .ci/run calls it after `npm test`.
import fs from "node:fs";
import path from "node:path";
import { startScaleStack } from "./lib/scale-stack.mjs";
import { run } from "./lib/processes.mjs";
import { log } from "./lib/system.mjs";

const root = path.resolve(import.meta.dirname, "..");
process.chdir(root);
const started = Date.now();
// Bounded: the stack goes down with the process, whatever happens.
setTimeout(() => { log("test:scale ran past 15 minutes: stopping"); process.exit(1); }, 15 * 60_000).unref();
for (const signal of ["SIGINT", "SIGTERM"]) process.on(signal, () => process.exit(130));

const results = { passed: 0, failed: 0 };
let stack;
try {
  stack = await startScaleStack({ seedDemo: true });
  const resultsFile = path.join(root, ".data", "test-scale-results.json");
  fs.rmSync(resultsFile, { force: true });
  const env = {
    ...process.env,
    DATABASE_URL: stack.databaseUrl,
    TEST_BASE_URL: stack.lbUrl,
    SCALE_WEB_URLS: stack.webs.map((w) => w.url).join(","),
    SCALE_WEB_PIDS: stack.webs.map((w) => w.child.pid).join(","),
    SCALE_WORKER_BUNDLE: path.join(root, ".worker", "worker.cjs"),
    HALFTRIP_TEST: "1",
  };
  run(path.join(root, "node_modules", ".bin", "vitest"), ["run", "--config", "vitest.scale.config.ts", "--reporter=default", "--reporter=json", `--outputFile.json=${resultsFile}`], { env });
  const v = fs.existsSync(resultsFile) ? JSON.parse(fs.readFileSync(resultsFile, "utf8")) : null;
  if (v) {
    results.passed += v.numPassedTests;
    results.failed += v.numFailedTests + (v.testResults ?? []).filter((s) => s.status === "failed" && !(s.assertionResults ?? []).some((a) => a.status === "failed")).length;
  } else {
    log("vitest wrote no results");
    results.failed += 1;
  }
} catch (err) {
  log(`test:scale set-up failed: ${err.stack ?? err.message}`);
  results.failed += 1;
} finally {
  await stack?.stop();
}
log(`test:scale finished in ${Math.round((Date.now() - started) / 1000)} s`);
process.stdout.write(`${results.passed} passed, ${results.failed} failed\n`);
process.exit(results.failed === 0 ? 0 : 1);
