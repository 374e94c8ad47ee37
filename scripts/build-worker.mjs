// Bundles the measurement worker into one CommonJS file for production runs (`npm start`, the worker
// benchmark): plain Node then runs it without compiling TypeScript at start, and without the compiler's
// own memory (about 50 MB of the process's resident set). Packages stay in node_modules.
import path from "node:path";
import { build } from "esbuild";

const root = path.resolve(import.meta.dirname, "..");
export const workerBundle = path.join(root, ".worker", "worker.cjs");

export async function buildWorker() {
  await build({
    entryPoints: [path.join(root, "workers", "worker.ts")],
    outfile: workerBundle,
    bundle: true,
    platform: "node",
    target: "node20",
    format: "cjs",
    packages: "external",
    tsconfig: path.join(root, "tsconfig.json"),
    logLevel: "warning",
  });
  return workerBundle;
}

if (process.argv[1] === import.meta.filename) {
  await buildWorker();
  process.stdout.write(`[halftrip] worker bundled in ${path.relative(root, workerBundle)}\n`);
}
