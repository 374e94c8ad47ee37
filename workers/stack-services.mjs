// Background services of `npm start` and `npm run dev`, started by scripts/stack.mjs once the web server
// answers: the measurement worker (when present) and the demo device simulator. None in test runs.
import fs from "node:fs";
import path from "node:path";
import { buildWorker } from "../scripts/build-worker.mjs";
import { workerRunEnv } from "../scripts/lib/worker-env.mjs";

const root = path.resolve(import.meta.dirname, "..");

export async function startBackgroundServices({ env, startService, bin, dev }) {
  if (env.HALFTRIP_TEST === "1") return;
  if (fs.existsSync(path.join(root, "workers", "worker.ts"))) {
    // In production the worker runs bundled, as plain JavaScript; `npm run dev` runs its sources.
    if (dev) startService("worker", bin("tsx"), ["workers/worker.ts"], { env });
    else startService("worker", process.execPath, [await buildWorker()], { env: workerRunEnv(env) });
  }
  startService("simulator", bin("tsx"), ["workers/simulator.ts"], { env: { ...env, SIM_BASE_URL: `http://127.0.0.1:${env.PORT}` } });
}
