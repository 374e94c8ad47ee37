// Child processes of the stack: started with their output prefixed, all stopped together on exit.
import { spawn, spawnSync } from "node:child_process";
import net from "node:net";
import { log } from "./system.mjs";

const children = new Set();

// A stack that ends any other way than its own shutdown (an uncaught error, a reader of its output that
// went away, as with `npm start | head`) still takes its services down with it.
process.on("exit", () => {
  for (const child of children) {
    try { process.kill(-child.pid, "SIGTERM"); } catch { /* already gone */ }
  }
});
process.stdout.on("error", (err) => {
  if (err.code === "EPIPE") process.kill(process.pid, "SIGTERM");
});

export function run(cmd, args, { env = process.env, quiet = false } = {}) {
  const r = spawnSync(cmd, args, { stdio: quiet ? "pipe" : "inherit", env, encoding: "utf8" });
  return r.status ?? 1;
}

export function runOrDie(cmd, args, opts) {
  const status = run(cmd, args, opts);
  if (status !== 0) throw new Error(`${cmd} ${args.join(" ")} exited with ${status}`);
}

export function startService(name, cmd, args, { env = process.env, silent = false } = {}) {
  const child = spawn(cmd, args, { env, stdio: ["ignore", "pipe", "pipe"], detached: true });
  const prefix = (chunk) => chunk.toString().split("\n").filter(Boolean).map((l) => `[${name}] ${l}\n`).join("");
  if (!silent) {
    child.stdout.on("data", (c) => process.stdout.write(prefix(c)));
  } else {
    child.stdout.resume();
  }
  child.stderr.on("data", (c) => process.stderr.write(prefix(c)));
  child.on("exit", (code, signal) => {
    children.delete(child);
    if (!child.stopping) log(`${name} exited (${signal ?? code})`);
  });
  child.serviceName = name;
  children.add(child);
  return child;
}

export async function stopServices() {
  const waits = [...children].map(
    (child) =>
      new Promise((resolve) => {
        child.stopping = true;
        child.once("exit", resolve);
        try { process.kill(-child.pid, "SIGTERM"); } catch { resolve(); }
        setTimeout(() => { try { process.kill(-child.pid, "SIGKILL"); } catch { /* gone */ } resolve(); }, 5000).unref();
      }),
  );
  await Promise.all(waits);
}

export async function waitForUrl(url, timeoutMs = 60000) {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    try {
      const res = await fetch(url);
      if (res.ok) return;
    } catch { /* not up yet */ }
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`${url} did not answer within ${timeoutMs / 1000} s`);
}

// A port nothing listens on now, so a test stack runs beside another copy of the product.
export function freePort() {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const { port } = server.address();
      server.close(() => resolve(port));
    });
  });
}
