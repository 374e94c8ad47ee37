import { execFile, spawn, type ChildProcess } from "node:child_process";
import path from "node:path";
import { promisify } from "node:util";

// The measurement worker as `npm run worker:once` runs it (the sources with tsx, `--once`), against the
// test stack's database. Vitest and Playwright both run from the repository root.
const ROOT = process.cwd();
const TSX = path.join(ROOT, "node_modules/.bin/tsx");
const WORKER = path.join(ROOT, "workers/worker.ts");
const run = promisify(execFile);

const workerEnv = (env: Record<string, string>) => ({ ...process.env, WORKER_QUIET: "1", ...env });

/** One pass that drains the queue; resolves with the worker's output when it exits. */
export async function runWorkerOnce(env: Record<string, string> = {}): Promise<string> {
  const { stdout } = await run(TSX, [WORKER, "--once"], { cwd: ROOT, env: workerEnv(env), timeout: 180_000, maxBuffer: 16 * 1024 * 1024 });
  return stdout;
}

/** The same pass in the background, in its own process group, for a test that kills it midway. */
export function startWorkerOnce(env: Record<string, string> = {}): ChildProcess {
  return spawn(TSX, [WORKER, "--once"], { cwd: ROOT, env: workerEnv(env), detached: true, stdio: "ignore" });
}
