// The measurement worker. `tsx workers/worker.ts` runs a cycle as soon as the ingest announces readings
// (LISTEN readings) and every WORKER_INTERVAL_S seconds as a fallback (10 by default; WORKER_CRON
// overrides with a 6-field cron expression), runs the background jobs (graphile-worker: alarm e-mails,
// recompute requests, the periodic checks node-cron enqueues on the same schedule); `--once` processes
// everything waiting, including recompute requests and jobs ready now, and exits. Several may run at once.
import v8 from "node:v8";
import vm from "node:vm";
import cron from "node-cron";
import pg from "pg";
import { getSequelize } from "../lib/db/sequelize";
import { env, requireSettings } from "../lib/env";
import type { BatchHook } from "../lib/worker/batch";
import { runCycle, type CycleHook, type CycleResult } from "../lib/worker/cycle";
import { ensurePartitions } from "../lib/worker/maintenance";
import { alarmBatchHook, alarmCycleHook } from "../lib/worker/hooks";
import { enqueuePeriodicChecks, runReadyJobs, startJobRunner } from "../lib/worker/jobs";
import { applyRetention } from "../lib/services/retention";

// Alarm evaluation and notification plug in here: batch hooks run inside each batch's transaction,
// cycle hooks once per cycle after the queue is drained (with `--once`; the long-running worker runs
// them as the periodic check-alarms job).
const batchHooks: BatchHook[] = [alarmBatchHook];

const once = process.argv.includes("--once");
const { batchSize, schedule, quiet, heapCollectAboveBytes } = env.worker;
const PARTITION_EVERY_MS = 24 * 3600 * 1000;

let lastPartitionCheck = 0;

// V8 lets the heap grow far past what a batch needs before it collects; a full collection when a
// batch leaves more than this behind keeps the worker's resident memory near its working set.
const HEAP_COLLECT_ABOVE_BYTES = heapCollectAboveBytes;
v8.setFlagsFromString("--expose-gc");
const collectGarbage = vm.runInNewContext("gc") as (options: { type: "major"; execution: "async" }) => Promise<void>;
let collecting = false;

// Asynchronous: V8 marks the heap incrementally and on a helper thread while the next batch goes on.
function keepMemoryInCheck() {
  if (collecting || process.memoryUsage().heapUsed <= HEAP_COLLECT_ABOVE_BYTES) return;
  collecting = true;
  collectGarbage({ type: "major", execution: "async" }).finally(() => {
    collecting = false;
  });
}

function log(message: string) {
  if (!quiet) process.stdout.write(`[worker ${process.pid}] ${message}\n`);
}

function describe(r: CycleResult): string {
  const parts = [`${r.readings} readings → ${r.measurements} measurements in ${r.batches} batches`];
  if (r.lateTemperature) parts.push(`${r.lateTemperature} channels to recompute with temperature samples that came late`);
  if (r.recomputed.requests) parts.push(`recomputed ${r.recomputed.channels} channels (${r.recomputed.measurements} measurements)`);
  if (r.offlineFlagged) parts.push(`${r.offlineFlagged} channels offline`);
  if (r.dipsEvaluated) parts.push(`${r.dipsEvaluated} dips compared`);
  if (r.forecasts) parts.push(`${r.forecasts} forecasts`);
  const t = r.timings;
  return `${parts.join(", ")} (${r.ms} ms: drain ${t.drain}, late temperature ${t.lateTemperature}, recompute ${t.recompute}, offline ${t.offline}, dips ${t.dips}, forecasts ${t.forecasts}, hooks ${t.hooks})`;
}

async function ensurePartitionsDaily() {
  if (Date.now() - lastPartitionCheck < PARTITION_EVERY_MS) return;
  lastPartitionCheck = Date.now();
  try {
    await ensurePartitions();
    await applyRetention();
  } catch (err) {
    // A default partition holding rows of the new month blocks creating it; the data stays readable.
    console.error("[worker] could not create partitions:", err instanceof Error ? err.message : err);
  }
}

async function cycle(): Promise<CycleResult> {
  await ensurePartitionsDaily();
  const cycleHooks: CycleHook[] = once ? [alarmCycleHook] : [];
  const result = await runCycle({ batchSize, batchHooks, cycleHooks, maxDrainMs: once ? Infinity : 60_000, afterBatch: keepMemoryInCheck, fleetChores: once });
  if (result.readings || result.lateTemperature || result.recomputed.requests || result.offlineFlagged || result.dipsEvaluated || result.forecasts) log(describe(result));
  return result;
}

async function runOnce() {
  // A recompute or a late reading can leave work for another pass; stop when a pass finds nothing.
  for (let pass = 0; pass < 10; pass++) {
    const r = await cycle();
    await runReadyJobs();
    if (r.drained && r.readings === 0 && r.recomputed.requests === 0 && r.lateTemperature === 0) break;
  }
}

const WAKE_CHANNEL = "readings";
const RELISTEN_AFTER_MS = 5000;

/**
 * A dedicated connection LISTENing for the ingest's NOTIFY: each request that queued readings wakes the
 * worker at once. If the connection drops it is opened again; the cron tick covers the gap.
 */
function listenForReadings(wake: () => void): { close(): Promise<void> } {
  let client: pg.Client | null = null;
  let closed = false;
  const connect = () => {
    if (closed) return;
    const c = new pg.Client({ connectionString: env.databaseUrl });
    client = c;
    const retry = (err: unknown) => {
      if (client !== c) return;
      client = null;
      if (!closed) console.error("[worker] wake-up connection lost, reconnecting:", err instanceof Error ? err.message : err);
      c.end().catch(() => undefined);
      setTimeout(connect, RELISTEN_AFTER_MS).unref();
    };
    c.on("notification", wake);
    c.on("error", retry);
    c.connect()
      .then(() => c.query(`LISTEN ${WAKE_CHANNEL}`))
      .catch(retry);
  };
  connect();
  return {
    async close() {
      closed = true;
      await client?.end().catch(() => undefined);
    },
  };
}

async function main() {
  // Ack links are signed and alarms e-mailed: in production a missing setting stops the worker here.
  requireSettings("databaseUrl", "authSecret", "smtpUrl", "appUrl");
  if (once) {
    await runOnce();
    await getSequelize().close();
    return;
  }
  if (!cron.validate(schedule)) throw new Error(`WORKER_CRON "${schedule}" is not a valid cron expression`);
  log(`running on each arrival of readings and every cycle of "${schedule}", batches of ${batchSize}`);
  const jobs = await startJobRunner();
  // One cycle at a time; a wake or tick while one runs leaves one more to run after it (at most one
  // pending, however many requests arrive meanwhile), so readings that came mid-cycle are not left waiting.
  let running: Promise<void> | null = null;
  let pending = false;
  const tick = () => {
    if (running) {
      pending = true;
      return;
    }
    pending = false;
    running = cycle()
      .then(() => undefined, (err) => console.error("[worker] cycle failed:", err))
      .finally(() => {
        running = null;
        if (pending) tick();
      });
  };
  const wakeUp = listenForReadings(tick);
  const task = cron.schedule(schedule, tick, { name: "measurement-worker" });
  const checks = cron.schedule(
    schedule,
    () => void enqueuePeriodicChecks().catch((err) => console.error("[worker] could not enqueue the periodic checks:", err instanceof Error ? err.message : err)),
    { name: "periodic-checks" },
  );
  const stop = async () => {
    log("stopping");
    await task.stop();
    await checks.stop();
    await wakeUp.close();
    pending = false;
    // Let a cycle in progress finish; a kill instead rolls its batch back, which is safe too.
    if (running) await running;
    await jobs.stop();
    await getSequelize().close();
    process.exit(0);
  };
  process.on("SIGINT", stop);
  process.on("SIGTERM", stop);
  tick();
}

main().catch(async (err) => {
  console.error("[worker] failed:", err);
  await getSequelize().close().catch(() => undefined);
  process.exit(1);
});
