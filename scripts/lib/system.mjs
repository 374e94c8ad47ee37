// Small helpers shared by the start/test/dev scripts; plain Node so they run before `npm ci`.
import { spawnSync } from "node:child_process";
import fs from "node:fs";

export function log(message) {
  process.stdout.write(`[halftrip] ${message}\n`);
}

function hasDebianPackage(name) {
  const r = spawnSync("dpkg-query", ["-W", "-f=${Status}", name], { encoding: "utf8" });
  return r.status === 0 && r.stdout.includes("install ok installed");
}

let aptUpdated = false;
export function ensureDebianPackages(names) {
  const missing = names.filter((n) => !hasDebianPackage(n));
  if (!missing.length) return;
  log(`installing Debian packages: ${missing.join(", ")}`);
  const env = { ...process.env, DEBIAN_FRONTEND: "noninteractive" };
  if (!aptUpdated) {
    spawnSync("apt-get", ["update", "-qq"], { stdio: "inherit", env });
    aptUpdated = true;
  }
  const r = spawnSync("apt-get", ["install", "-y", "-qq", "--no-install-recommends", ...missing], { stdio: "inherit", env });
  if (r.status !== 0) throw new Error(`apt-get install ${missing.join(" ")} failed`);
}

export function ensureChromium() {
  if (fs.existsSync("/usr/bin/chromium")) return "/usr/bin/chromium";
  ensureDebianPackages(["chromium"]);
  return "/usr/bin/chromium";
}
