// Background services of `npm start` and `npm run dev`, started by scripts/stack.mjs once the web server
// answers: the measurement worker (when present) and the demo device simulator. None in test runs.
import fs from "node:fs";
import path from "node:path";

const root = path.resolve(import.meta.dirname, "..");

export async function startBackgroundServices({ env, startService, bin }) {
  if (env.HALFTRIP_TEST === "1") return;
  if (fs.existsSync(path.join(root, "workers", "worker.ts"))) {
    startService("worker", bin("tsx"), ["workers/worker.ts"], { env });
  }
  startService("simulator", bin("tsx"), ["workers/simulator.ts"], { env: { ...env, SIM_BASE_URL: `http://127.0.0.1:${env.PORT}` } });
}
