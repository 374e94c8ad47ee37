// `next build` only when the sources changed since the last build into that dist folder: a hash of the
// build's inputs is kept beside the build. Used by `npm start`/`npm test` and by the scale stack.
import { createHash } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { runOrDie } from "./processes.mjs";
import { log } from "./system.mjs";

const root = path.resolve(import.meta.dirname, "../..");
const BUILD_INPUTS = ["app", "components", "lib", "public", "fonts", "proxy.ts", "next.config.mjs", "tailwind.config.ts", "postcss.config.mjs", "tsconfig.json", "package-lock.json"];

function sourceHash() {
  const hash = createHash("sha256");
  const walk = (p) => {
    const st = fs.statSync(p, { throwIfNoEntry: false });
    if (!st) return;
    if (st.isDirectory()) for (const e of fs.readdirSync(p).sort()) walk(path.join(p, e));
    else hash.update(p).update(fs.readFileSync(p));
  };
  for (const input of BUILD_INPUTS) walk(path.join(root, input));
  return hash.digest("hex");
}

export function buildIfChanged(env, distDir = ".next") {
  const stamp = path.join(root, distDir, "halftrip-source-hash");
  const current = sourceHash();
  if (fs.existsSync(stamp) && fs.readFileSync(stamp, "utf8") === current && fs.existsSync(path.join(root, distDir, "BUILD_ID"))) {
    log(`build in ${distDir} is up to date`);
    return;
  }
  log(`building into ${distDir} (sources changed)`);
  const bin = path.join(root, "node_modules", ".bin", "next");
  runOrDie(bin, ["build"], { env: { ...env, NEXT_TELEMETRY_DISABLED: "1", ...(distDir === ".next" ? {} : { NEXT_DIST_DIR: distDir }) } });
  fs.writeFileSync(stamp, current);
}
