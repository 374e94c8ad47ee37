// What the worker remembers about a channel between batches, stored as jsonb in channel_state, so a
// batch resumes exactly where the previous one stopped (Hampel window, bay state, CUSUM, runs).

import { initialBayState, type BayState } from "../../occupancy/bay";
import type { CusumState } from "../../signal/cusum";
import type { HealthFlagKind } from "../../health/flags";

export interface DriftState {
  /** Residual noise σ, fixed once the warm-up is complete; null while warming up. */
  sigma: number | null;
  warmup: number[];
  cusum: CusumState;
  /** When the current upper / lower run of the chart began (epoch ms). */
  plusStartMs: number | null;
  minusStartMs: number | null;
  /** Residuals since the chart last signalled; null when it never has. */
  sinceSignal: number | null;
}

export interface RunState {
  /** Consecutive readings with the status, and when the run began. */
  count: number;
  sinceMs: number | null;
  /** Consecutive readings without it. */
  good: number;
}

export interface OpenFlag {
  sinceMs: number;
}

export interface ChannelState {
  v: 1;
  lastAtMs: number | null;
  lastReadingId: number | null;
  /** Recent distances, oldest first: the Hampel filter's window. */
  hampel: number[];
  bay: BayState;
  drift: DriftState;
  /** Recent raw values (time of flight, pulse, duty), and the current run of equal values: its length and start. */
  stuck: { values: number[]; runStartMs: number | null; runLength?: number };
  noisy: { spreads: number[]; values: number[] };
  outOfRange: RunState;
  noEcho: RunState;
  /** Recent apparent/expected speed-of-sound ratios against the channel's reference distance. */
  apparentRatios: number[];
  /** Flags this worker opened and has not cleared (offline is tracked in its own column). */
  open: Partial<Record<HealthFlagKind, OpenFlag>>;
}

const ZERO_CUSUM: CusumState = { cPlus: 0, cMinus: 0, nPlus: 0, nMinus: 0 };

export function initialChannelState(): ChannelState {
  return {
    v: 1,
    lastAtMs: null,
    lastReadingId: null,
    hampel: [],
    bay: initialBayState(),
    drift: { sigma: null, warmup: [], cusum: { ...ZERO_CUSUM }, plusStartMs: null, minusStartMs: null, sinceSignal: null },
    stuck: { values: [], runStartMs: null, runLength: 0 },
    noisy: { spreads: [], values: [] },
    outOfRange: { count: 0, sinceMs: null, good: 0 },
    noEcho: { count: 0, sinceMs: null, good: 0 },
    apparentRatios: [],
    open: {},
  };
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === "object" && value !== null && !Array.isArray(value);
}

/**
 * Reads a stored state; anything missing or of another version starts from the initial state, so
 * an empty '{}' row or an old layout never breaks a batch.
 */
export function parseChannelState(stored: unknown): ChannelState {
  const initial = initialChannelState();
  if (!isRecord(stored) || stored.v !== 1) return initial;
  return { ...initial, ...(stored as Partial<ChannelState>) };
}

/**
 * Values kept in the state are rounded to 0.1 µm (or 1e-7 of a ratio): far below any sensor's
 * resolution, and it halves the stored JSON. Rounding when a value enters a window, not when the
 * state is saved, keeps a batch that resumes from the database identical to one that continues in
 * memory (a recompute), so both give the same rows.
 */
export function roundForState(x: number): number {
  return Math.round(x * 1e7) / 1e7;
}

/** Appends a value to a window the caller owns, dropping the oldest beyond `size`. */
export function pushInto(window: number[], value: number, size: number): void {
  window.push(value);
  while (window.length > size) window.shift();
}
