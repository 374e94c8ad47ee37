import fs from "node:fs";
import path from "node:path";
import { env } from "../lib/env";
import { demoKeysFilePath, parseKeysFile, simulatorStateFilePath, type SimDevice } from "./simulation/keys-file";
import {
  advanceDevice,
  isCatchingUp,
  MAX_BATCH,
  newSimulatorState,
  parseSimulatorState,
  reconcileState,
  retryAfterMs,
  type SimulatorState,
} from "./simulation/state";
import type { ScenarioClock } from "./simulation/scenario";

// The demo fleet's field units: measures the scenario and pushes it through the real device API, first
// the history (store-and-forward batches with `at` set), then live. Run: npx tsx workers/simulator.ts

const ROOT = process.cwd();
const { baseUrl: BASE_URL, intervalMs: LIVE_INTERVAL_MS, backfillDays: BACKFILL_DAYS } = env.simulator;
const KEYS_FILE = demoKeysFilePath(env.dataFiles, ROOT);
const STATE_FILE = simulatorStateFilePath(env.dataFiles, ROOT);
const REQUEST_TIMEOUT_MS = 30_000;
// Stay under the devices' default limit of 120 requests a minute while racing through history.
const MIN_REQUEST_GAP_MS = 600;
const NETWORK_BACKOFF_MS = [2_000, 5_000, 15_000, 30_000, 60_000];
const KEY_REFUSED_RETRY_MS = 60_000;

interface Tally {
  requests: number;
  accepted: number;
  duplicates: number;
  rejected: number;
  dropped: number;
  measured: number;
  problems: string[];
}

/** Per device, in memory only: when it may send next (its own rate limit, a refused key). */
const pacing = new Map<string, { notBefore: number }>();
/** The API as a whole: unreachable or out of database, it is down for every device alike. */
const api = { downUntil: 0, failures: 0 };
let keysMtimeMs = 0;
let devices: SimDevice[] = [];
let stopping = false;

const say = (line: string) => process.stdout.write(`${line}\n`);

function loadKeys(): boolean {
  let mtime: number;
  try {
    mtime = fs.statSync(KEYS_FILE).mtimeMs;
  } catch {
    return false;
  }
  if (mtime === keysMtimeMs) return true;
  const file = parseKeysFile(fs.readFileSync(KEYS_FILE, "utf8"));
  if (!file) return false;
  keysMtimeMs = mtime;
  // Units that carry a site's temperature channel send first, so their samples are stored before the worker measures the site's other channels.
  devices = [...file.devices].sort((a, b) => Number(b.channels.some((c) => c.temperature_source)) - Number(a.channels.some((c) => c.temperature_source)));
  say(`keys: ${devices.length} devices from ${path.relative(ROOT, KEYS_FILE)}`);
  return true;
}

function loadState(nowMs: number): SimulatorState {
  try {
    const saved = parseSimulatorState(fs.readFileSync(STATE_FILE, "utf8"));
    if (saved) return saved;
  } catch {
    // No state yet: this is the first run.
  }
  return newSimulatorState(nowMs, BACKFILL_DAYS);
}

function saveState(state: SimulatorState) {
  fs.mkdirSync(path.dirname(STATE_FILE), { recursive: true });
  const tmp = `${STATE_FILE}.${process.pid}.tmp`;
  fs.writeFileSync(tmp, JSON.stringify(state));
  fs.renameSync(tmp, STATE_FILE);
}

function pace(deviceId: string) {
  let p = pacing.get(deviceId);
  if (!p) pacing.set(deviceId, (p = { notBefore: 0 }));
  return p;
}

async function errorText(res: Response): Promise<string> {
  try {
    const body = (await res.json()) as { error?: string; message?: string };
    return `${body.error ?? res.status}: ${body.message ?? ""}`.trim();
  } catch {
    return String(res.status);
  }
}

function apiDown(wait: number, why: string, tally: Tally) {
  api.failures += 1;
  api.downUntil = Date.now() + wait;
  tally.problems.push(`${why}, resending after ${Math.round(wait / 1000)} s`);
}

const backoff = () => NETWORK_BACKOFF_MS[Math.min(api.failures, NETWORK_BACKOFF_MS.length - 1)];

/**
 * Sends the oldest batch of a device's backlog; what the API took leaves the backlog, the rest waits with
 * the same seqs. Returns false when the API is down, so the round stops there.
 */
async function sendBatch(device: SimDevice, state: SimulatorState, tally: Tally): Promise<boolean> {
  const ds = state.devices[device.id];
  const p = pace(device.id);
  const now = Date.now();
  if (!ds.backlog.length) return true;
  if (now < p.notBefore) return true;
  const batch = ds.backlog.slice(0, MAX_BATCH);
  p.notBefore = now + MIN_REQUEST_GAP_MS;
  tally.requests += 1;
  let res: Response;
  try {
    res = await fetch(`${BASE_URL}/api/v1/readings`, {
      method: "POST",
      headers: { authorization: `Bearer ${device.api_key}`, "content-type": "application/json" },
      body: JSON.stringify({ readings: batch }),
      signal: AbortSignal.timeout(REQUEST_TIMEOUT_MS),
    });
  } catch (err) {
    const reason = err instanceof Error ? ((err.cause as Error | undefined)?.message ?? err.message) : String(err);
    apiDown(backoff(), `API unreachable (${reason})`, tally);
    return false;
  }
  if (res.status === 202) {
    let body: { accepted: number; duplicates: number; rejected: { index: number; error: string }[] };
    try {
      body = await res.json();
    } catch {
      // The answer was cut off: whether it was stored is unknown, so resend (a duplicate is harmless).
      tally.problems.push(`${device.serial}: unreadable 202 answer, resending`);
      return true;
    }
    ds.backlog.splice(0, batch.length);
    api.failures = 0;
    tally.accepted += body.accepted;
    tally.duplicates += body.duplicates;
    tally.rejected += body.rejected.length;
    if (body.rejected.length) tally.problems.push(`${device.serial}: rejected #${body.rejected[0].index} ${body.rejected[0].error}`);
    return true;
  }
  const retryAfter = retryAfterMs(res.headers.get("retry-after"), Date.now());
  if (res.status === 429 || res.status === 401 || res.status >= 500) await res.body?.cancel();
  if (res.status === 429) {
    // Over this device's own rate: only it waits.
    const wait = retryAfter ?? 60_000;
    p.notBefore = Date.now() + wait;
    tally.problems.push(`${device.serial}: 429, resending after ${Math.round(wait / 1000)} s`);
    return true;
  }
  if (res.status >= 500) {
    apiDown(retryAfter ?? backoff(), `API answered ${res.status}`, tally);
    return false;
  }
  if (res.status === 401) {
    p.notBefore = Date.now() + KEY_REFUSED_RETRY_MS;
    tally.problems.push(`${device.serial}: key refused (401); run the seed to rotate the demo keys`);
    return true;
  }
  // 400, 413, 415: the batch itself is at fault and would fail again; drop it rather than block the device.
  ds.backlog.splice(0, batch.length);
  tally.dropped += batch.length;
  tally.problems.push(`${device.serial}: batch dropped, ${await errorText(res)}`);
  return true;
}

function progressLabel(state: SimulatorState, nowMs: number): string {
  if (state.backfill_done) return "live";
  const span = nowMs - state.origin_ms;
  const done = Object.values(state.devices).reduce((min, d) => Math.min(min, d.cursor_ms), nowMs);
  return `backfill ${Math.min(100, Math.max(0, Math.round(((done - state.origin_ms) / span) * 100)))} %`;
}

function logCycle(state: SimulatorState, tally: Tally, nowMs: number) {
  const backlog = Object.values(state.devices).reduce((n, d) => n + d.backlog.length, 0);
  const parts = [
    `${new Date(nowMs).toISOString().slice(0, 19)}Z ${progressLabel(state, nowMs)}`,
    `${tally.measured} measured`,
    `${tally.requests} requests: ${tally.accepted} accepted, ${tally.duplicates} duplicates, ${tally.rejected} rejected${tally.dropped ? `, ${tally.dropped} dropped` : ""}`,
    `backlog ${backlog}`,
  ];
  if (tally.problems.length) parts.push(tally.problems.slice(0, 3).join("; ") + (tally.problems.length > 3 ? ` (+${tally.problems.length - 3} more)` : ""));
  say(parts.join(" · "));
}

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

async function waitForKeys() {
  let told = false;
  while (!stopping && !loadKeys()) {
    if (!told) say(`waiting for ${path.relative(ROOT, KEYS_FILE)} (written by the demo seed)`);
    told = true;
    await sleep(10_000);
  }
}

async function main() {
  await waitForKeys();
  let state = loadState(Date.now());
  say(`sending to ${BASE_URL}/api/v1/readings · live every ${LIVE_INTERVAL_MS / 1000} s · backfill ${BACKFILL_DAYS} days${state.backfill_done ? " (done before)" : ""}`);
  const onSignal = () => {
    stopping = true;
    saveState(state);
    process.exit(0);
  };
  process.on("SIGINT", onSignal);
  process.on("SIGTERM", onSignal);

  while (!stopping) {
    loadKeys();
    const now = Date.now();
    state = reconcileState(state, devices, now, BACKFILL_DAYS);
    const clock: ScenarioClock = { originMs: state.origin_ms, firstRunMs: state.first_run_ms };
    const tally: Tally = { requests: 0, accepted: 0, duplicates: 0, rejected: 0, dropped: 0, measured: 0, problems: [] };
    let sending = now >= api.downUntil;
    for (const device of devices) {
      const { measured, dropped } = advanceDevice(device, state.devices[device.id], now, LIVE_INTERVAL_MS, clock);
      tally.measured += measured;
      tally.dropped += dropped;
      if (sending) sending = await sendBatch(device, state, tally);
    }
    const catchingUp = devices.some((d) => isCatchingUp(state.devices[d.id], Date.now()));
    const pending = devices.some((d) => state.devices[d.id].backlog.length > 0);
    if (!state.backfill_done && !catchingUp && !pending) {
      state.backfill_done = true;
      tally.problems.unshift("backfill done, now live");
    }
    saveState(state);
    if (tally.requests || tally.measured || tally.problems.length) logCycle(state, tally, now);
    // Straight on while there is history or a backlog to deliver; otherwise until the next live cycle.
    const nextCycle = Math.min(...devices.map((d) => state.devices[d.id].cursor_ms), now + LIVE_INTERVAL_MS);
    const nextSend = pending ? Math.max(api.downUntil, Math.min(...devices.filter((d) => state.devices[d.id].backlog.length).map((d) => pace(d.id).notBefore))) : Infinity;
    const wake = catchingUp ? Math.max(Math.min(nextSend, Date.now() + MIN_REQUEST_GAP_MS), Date.now()) : Math.min(nextCycle, nextSend);
    await sleep(Math.max(50, wake - Date.now()));
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
