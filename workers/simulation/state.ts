import type { SimDevice } from "./keys-file";
import { seedFromText } from "./random";
import { isDeviceOffline, readingsForCycle, type DraftReading, type OutgoingReading, type ScenarioClock } from "./scenario";

// The simulator's memory between runs: each channel's next seq, where each device's timeline has got to,
// and the readings it has measured but not yet delivered (resent with the same seq until accepted).

export const BACKFILL_STEP_MS = 5 * 60_000;
export const MAX_BATCH = 500;
/** A field unit's buffer is finite: beyond this the oldest unsent readings are dropped. */
export const MAX_BACKLOG = 5_000;
const DAY_MS = 86_400_000;

export interface DeviceState {
  /** Next seq per channel index. */
  next_seq: Record<string, number>;
  /** Time of the device's next measuring cycle, ms. */
  cursor_ms: number;
  backlog: OutgoingReading[];
}

export interface SimulatorState {
  version: 1;
  origin_ms: number;
  first_run_ms: number;
  backfill_done: boolean;
  devices: Record<string, DeviceState>;
}

export function newSimulatorState(nowMs: number, backfillDays: number): SimulatorState {
  return { version: 1, origin_ms: nowMs - backfillDays * DAY_MS, first_run_ms: nowMs, backfill_done: false, devices: {} };
}

/** The saved state, or null when the text is not one (then the simulator starts afresh). */
export function parseSimulatorState(text: string): SimulatorState | null {
  try {
    const s = JSON.parse(text) as SimulatorState;
    if (s?.version !== 1 || typeof s.origin_ms !== "number" || typeof s.first_run_ms !== "number" || !s.devices || typeof s.devices !== "object") return null;
    return s;
  } catch {
    return null;
  }
}

/** First backfilled cycle of a device: on the 5-minute grid, shifted by a few seconds of its own so devices do not ping in step. */
function backfillStartMs(deviceId: string, nowMs: number, backfillDays: number): number {
  const from = nowMs - backfillDays * DAY_MS;
  return Math.floor(from / BACKFILL_STEP_MS) * BACKFILL_STEP_MS + (seedFromText(deviceId) % 120) * 1000;
}

/**
 * Fits the state to the devices in the keys file: new devices start their backfill, devices no longer
 * there are forgotten, and a device that was away longer than the backfill window resumes at its start.
 */
export function reconcileState(state: SimulatorState, devices: SimDevice[], nowMs: number, backfillDays: number): SimulatorState {
  const next: Record<string, DeviceState> = {};
  const earliest = nowMs - backfillDays * DAY_MS;
  for (const d of devices) {
    const saved = state.devices[d.id];
    if (saved) next[d.id] = { ...saved, cursor_ms: Math.max(saved.cursor_ms, earliest) };
    else next[d.id] = { next_seq: {}, cursor_ms: backfillStartMs(d.id, nowMs, backfillDays), backlog: [] };
  }
  const added = devices.some((d) => !state.devices[d.id]);
  return { ...state, backfill_done: state.backfill_done && !added, devices: next };
}

/** Numbers a cycle's readings with each channel's next seq and advances the counters. */
export function assignSeqs(device: DeviceState, drafts: DraftReading[]): OutgoingReading[] {
  return drafts.map((r) => {
    const key = String(r.channel);
    const seq = device.next_seq[key] ?? 1;
    device.next_seq[key] = seq + 1;
    return { seq, ...r };
  });
}

/** Appends to the backlog, dropping the oldest beyond MAX_BACKLOG; returns how many were dropped. */
export function appendToBacklog(device: DeviceState, readings: OutgoingReading[], cap = MAX_BACKLOG): number {
  device.backlog.push(...readings);
  const excess = device.backlog.length - cap;
  if (excess <= 0) return 0;
  device.backlog.splice(0, excess);
  return excess;
}

/** Whether a device is still working through its history (cycles more than one backfill step behind). */
export function isCatchingUp(device: DeviceState, nowMs: number): boolean {
  return device.cursor_ms + BACKFILL_STEP_MS <= nowMs;
}

/**
 * The cycle after cursorMs: 5 minutes on while catching up on history; once near now, the next tick of a
 * live grid shared by all devices, so that the fleet measures (and the simulator logs) once a live interval.
 */
export function nextCycleMs(cursorMs: number, nowMs: number, liveStepMs: number): number {
  if (cursorMs + BACKFILL_STEP_MS <= nowMs) return cursorMs + BACKFILL_STEP_MS;
  return (Math.floor(cursorMs / liveStepMs) + 1) * liveStepMs;
}

/** Retry-After as a delay in ms (delta-seconds or an HTTP date, RFC 9110 §10.2.3), or null when absent or unreadable. */
export function retryAfterMs(header: string | null, nowMs: number): number | null {
  if (!header) return null;
  const trimmed = header.trim();
  if (/^\d+$/.test(trimmed)) return Number(trimmed) * 1000;
  const date = Date.parse(trimmed);
  return Number.isNaN(date) ? null : Math.max(0, date - nowMs);
}

/**
 * Measures every cycle of a device that is due by nowMs into its backlog. While catching up on history it
 * stops once a batch is waiting, so the backlog (and the state file) stay small; live cycles are always
 * measured, as a field unit keeps measuring while its link is down. A device that is offline measures nothing.
 */
export function advanceDevice(device: SimDevice, state: DeviceState, nowMs: number, liveStepMs: number, clock: ScenarioClock): { measured: number; dropped: number } {
  let measured = 0;
  let dropped = 0;
  while (state.cursor_ms <= nowMs && (state.backlog.length < MAX_BATCH || !isCatchingUp(state, nowMs))) {
    if (!isDeviceOffline(device, state.cursor_ms, clock)) {
      const readings = assignSeqs(state, readingsForCycle(device, state.cursor_ms, clock));
      measured += readings.length;
      dropped += appendToBacklog(state, readings);
    }
    state.cursor_ms = nextCycleMs(state.cursor_ms, nowMs, liveStepMs);
  }
  return { measured, dropped };
}
