import { spawn, type ChildProcess } from "node:child_process";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql } from "../support/db";
import { createTankWithDevice } from "../support/fleet";
import { DEMO_PASSWORD, signedIn, type Agent } from "../support/session";

// What must hold with two web instances behind the load balancer and several workers (issue 16). Run by
// `npm run test:scale` (scripts/test-scale.mjs), which starts the stack and names the instances here.
const webUrls = (process.env.SCALE_WEB_URLS ?? "").split(",");
const webPids = (process.env.SCALE_WEB_PIDS ?? "").split(",").map(Number);
const workerBundle = process.env.SCALE_WORKER_BUNDLE ?? "";
const lbUrl = process.env.TEST_BASE_URL ?? "";

const instance = (i: number) => request(webUrls[i % webUrls.length]);
const postReadings = (base: string, key: string, readings: object[]) =>
  request(base).post("/api/v1/readings").set("Authorization", `Bearer ${key}`).set("Content-Type", "application/json").send(JSON.stringify({ readings }));

async function signInAt(base: string, email: string, password: string, address = "198.51.100.1"): Promise<number> {
  const agent = request.agent(base);
  const csrf = await agent.get("/api/auth/csrf").expect(200);
  const res = await agent
    .post("/api/auth/callback/credentials")
    .set("X-Forwarded-For", address)
    .type("form")
    .send({ csrfToken: csrf.body.csrfToken, email, password, json: "true" });
  return res.status;
}

const workers: ChildProcess[] = [];
function startWorker(once: boolean): ChildProcess & { done: Promise<number | null> } {
  const child = spawn(process.execPath, [workerBundle, ...(once ? ["--once"] : [])], {
    env: { ...process.env, WORKER_QUIET: "1", WORKER_INTERVAL_S: "1", WORKER_BATCH_SIZE: "2000", MALLOC_MMAP_THRESHOLD_: "131072" },
    stdio: ["ignore", "ignore", "inherit"],
  });
  workers.push(child);
  return Object.assign(child, { done: new Promise<number | null>((resolve) => child.once("exit", (code) => resolve(code))) });
}

async function storedAndMeasured(deviceIds: string[]) {
  const [row] = await sql<{ readings: string; distinct_seqs: string; measurements: string; measured: string; queued: string }>(
    `SELECT (SELECT count(*) FROM readings WHERE device_id = ANY($1)) AS readings,
            (SELECT count(DISTINCT (device_id, channel, seq)) FROM readings WHERE device_id = ANY($1)) AS distinct_seqs,
            (SELECT count(*) FROM measurements WHERE device_id = ANY($1)) AS measurements,
            (SELECT count(DISTINCT reading_id) FROM measurements WHERE device_id = ANY($1)) AS measured,
            (SELECT count(*) FROM reading_queue q JOIN readings r ON r.id = q.reading_id WHERE r.device_id = ANY($1)) AS queued`,
    [deviceIds],
  );
  return Object.fromEntries(Object.entries(row).map(([k, v]) => [k, Number(v)]));
}

let admin: Agent;
beforeAll(async () => {
  expect(webUrls.length).toBe(2);
  admin = await signedIn("admin@halftrip.test");
});
afterAll(() => {
  for (const w of workers) if (w.exitCode === null && w.signalCode === null) w.kill("SIGKILL");
});

describe("two web instances share their counters through the database", () => {
  it("counts a device's rate limit once across both instances", async () => {
    const { apiKey, device } = await createTankWithDevice(admin, { maxRequestsPerMin: 6 });
    const statuses: number[] = [];
    for (let seq = 1; seq <= 10; seq++) statuses.push((await postReadings(webUrls[seq % 2], apiKey, [{ seq, channel: 0, echo_us: 5831 }])).status);
    // Six requests a minute in all, whichever instance took them; each instance alone saw five.
    expect(statuses.filter((s) => s === 202)).toHaveLength(6);
    expect(statuses.slice(6)).toEqual([429, 429, 429, 429]);
    expect((await storedAndMeasured([device.id])).readings).toBe(6);
  });

  it("counts sign-in attempts for one account once across both instances", async () => {
    const email = `nobody-${Date.now()}@example.org`;
    // 10 attempts per account within 15 minutes (docs/security.md), five on each instance, each from an address
    // of its own (documentation range, RFC 5737) so only the account's count can refuse; the eleventh is refused on either.
    for (let i = 0; i < 10; i++) expect(await signInAt(webUrls[i % 2], email, "wrong", `203.0.113.${i + 1}`)).toBe(401);
    expect(await signInAt(webUrls[0], email, "wrong", "203.0.113.101")).toBe(429);
    expect(await signInAt(webUrls[1], email, "wrong", "203.0.113.102")).toBe(429);
  });

  it("refuses a key revoked on one instance at the other on the next request", async () => {
    const { apiKey, device } = await createTankWithDevice(admin);
    expect((await postReadings(webUrls[1], apiKey, [{ seq: 1, channel: 0, echo_us: 5831 }])).status).toBe(202);
    const adminOnFirst = request.agent(webUrls[0]);
    const csrf = await adminOnFirst.get("/api/auth/csrf").expect(200);
    await adminOnFirst.post("/api/auth/callback/credentials").type("form").send({ csrfToken: csrf.body.csrfToken, email: "admin@halftrip.test", password: DEMO_PASSWORD, json: "true" });
    await adminOnFirst.delete(`/api/devices/${device.id}/key`).set("Origin", new URL(webUrls[0]).origin).expect(200);
    const refused = await postReadings(webUrls[1], apiKey, [{ seq: 2, channel: 0, echo_us: 5831 }]);
    expect(refused.status).toBe(401);
    expect((await storedAndMeasured([device.id])).readings).toBe(1);
  });
});

describe("several workers on one backlog", () => {
  it("measures each reading exactly once with two workers draining at the same time", async () => {
    const devices = await Promise.all([0, 1, 2].map(() => createTankWithDevice(admin, { channels: [0, 1, 2, 3], maxRequestsPerMin: 10_000 })));
    // One reading a second per device, all in the past two hours (readings from the future are refused).
    const start = Date.now() - 7_200_000;
    for (let batch = 0; batch < 20; batch++) {
      await Promise.all(
        devices.map(async (d, i) => {
          const readings = Array.from({ length: 250 }, (_, k) => ({ seq: batch * 250 + k, channel: k % 4, at: new Date(start + (batch * 250 + k) * 1000).toISOString(), echo_us: 5000 + ((i * 7 + k) % 900) }));
          expect((await instance(batch + i).post("/api/v1/readings").set("Authorization", `Bearer ${d.apiKey}`).set("Content-Type", "application/json").send(JSON.stringify({ readings }))).status).toBe(202);
        }),
      );
    }
    const ids = devices.map((d) => d.device.id as string);
    expect((await storedAndMeasured(ids)).readings).toBe(15_000);
    // Batches of 2 000, so the two workers take many batches each from the same queue.
    const [a, b] = [startWorker(true), startWorker(true)];
    expect(await a.done).toBe(0);
    expect(await b.done).toBe(0);
    expect(await storedAndMeasured(ids)).toEqual({ readings: 15_000, distinct_seqs: 15_000, measurements: 15_000, measured: 15_000, queued: 0 });
    const [rollups] = await sql<{ n_all: string }>(`SELECT sum(n_all) AS n_all FROM measurement_rollups r JOIN channels c ON c.id = r.channel_id WHERE c.device_id = ANY($1) AND r.bucket_s = 300`, [ids]);
    // Only channel 0 has an asset (and so rollups): k % 4 = 0 for 63 of each batch's 250 readings.
    expect(Number(rollups.n_all)).toBe(3 * 20 * 63);
  });
});

describe("a process killed under load loses nothing", () => {
  it("keeps and measures every reading once when a worker and a web instance are killed while a device sends", async () => {
    const { apiKey, device } = await createTankWithDevice(admin, { channels: [0, 1], maxRequestsPerMin: 10_000 });
    const BATCHES = 80;
    const PER_BATCH = 200;
    let resends = 0;
    let sent = 0;
    // The device: each batch until it gets a 202, through the load balancer (common practice for field units).
    const sending = (async () => {
      for (let batch = 0; batch < BATCHES; batch++) {
        const readings = Array.from({ length: PER_BATCH }, (_, k) => ({ seq: batch * PER_BATCH + k, channel: k % 2, echo_us: 5000 + (k % 700) }));
        for (let attempt = 0; ; attempt++) {
          expect(attempt).toBeLessThan(50);
          const status = await postReadings(lbUrl, apiKey, readings).then((r) => r.status, () => 0);
          if (status === 202) break;
          resends += 1;
          await new Promise((r) => setTimeout(r, 200));
        }
        sent += 1;
      }
    })();
    const first = startWorker(false);
    while (sent < 20) await new Promise((r) => setTimeout(r, 50));
    first.kill("SIGKILL");
    const second = startWorker(false);
    while (sent < 40) await new Promise((r) => setTimeout(r, 50));
    // The second web instance goes away without a graceful end; HAProxy sends the rest to the first.
    process.kill(-webPids[1], "SIGKILL");
    await sending;
    second.kill("SIGTERM");
    await second.done;
    const drain = startWorker(true);
    expect(await drain.done).toBe(0);
    expect(await storedAndMeasured([device.id])).toEqual({ readings: BATCHES * PER_BATCH, distinct_seqs: BATCHES * PER_BATCH, measurements: BATCHES * PER_BATCH, measured: BATCHES * PER_BATCH, queued: 0 });
    // Whether a kill caught a request in flight varies from run to run; a resent batch is stored once either way.
    process.stdout.write(`[test:scale] batches resent after a kill: ${resends}\n`);
  });
});
