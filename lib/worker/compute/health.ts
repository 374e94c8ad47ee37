// Health stage: one batch of measurements → changes to the channels' health flags (drift, stuck,
// noisy, offline gaps, out of range, no echo, crosstalk risk) and the state to resume from. The
// detectors are the pure ones in lib/health and lib/signal; this stage streams them over time.

import { apparentSpeedOfSound, detectCrosstalk, detectNoisy, detectOffline, detectStuck } from "../../health/flags";
import { createCusum } from "../../signal/cusum";
import { median, robustSigmaFromDifferences } from "../../signal/robust-stats";
import { pushInto, roundForState, type ChannelState, type DriftState, type RunState } from "./channel-state";
import { PIPELINE_SETTINGS } from "./settings";
import type { ChannelConfig, Measurement } from "./types";
import type { HealthFlagKind } from "../../health/flags";

export interface FlagOpen {
  channelId: string;
  flag: HealthFlagKind;
  since: Date;
  magnitude: number | null;
  details: Record<string, unknown>;
}

export interface FlagClear {
  channelId: string;
  flag: HealthFlagKind;
  at: Date;
}

export interface FlagInterval extends FlagOpen {
  clearedAt: Date;
}

/**
 * Applied in this order: clear flags that were open before the batch, insert the flags that opened
 * and cleared inside it, then open (or update the magnitude and details of) flags open at its end.
 */
export interface FlagChanges {
  clears: FlagClear[];
  intervals: FlagInterval[];
  opens: FlagOpen[];
}

export function emptyFlagChanges(): FlagChanges {
  return { clears: [], intervals: [], opens: [] };
}

interface Current {
  sinceMs: number;
  magnitude: number | null;
  details: Record<string, unknown>;
  /** Open before this batch began (so a clear updates the stored row). */
  carried: boolean;
}

/** Follows one channel's flags through a batch and turns the events into FlagChanges. */
export class FlagTracker {
  private readonly current = new Map<HealthFlagKind, Current>();
  private readonly changes = emptyFlagChanges();

  constructor(private readonly channelId: string, open: ChannelState["open"]) {
    for (const [flag, o] of Object.entries(open) as [HealthFlagKind, { sinceMs: number }][]) {
      this.current.set(flag, { sinceMs: o.sinceMs, magnitude: null, details: {}, carried: true });
    }
  }

  isOpen(flag: HealthFlagKind): boolean {
    return this.current.has(flag);
  }

  /** Opens the flag, or updates the magnitude and details of the one already open (keeping its since). */
  raise(flag: HealthFlagKind, sinceMs: number, magnitude: number | null, details: Record<string, unknown>): void {
    const open = this.current.get(flag);
    if (open) this.current.set(flag, { ...open, magnitude, details, carried: open.carried });
    else this.current.set(flag, { sinceMs, magnitude, details, carried: false });
  }

  clear(flag: HealthFlagKind, atMs: number): void {
    const open = this.current.get(flag);
    if (!open) return;
    this.current.delete(flag);
    const at = new Date(Math.max(atMs, open.sinceMs));
    if (open.carried) this.changes.clears.push({ channelId: this.channelId, flag, at });
    else this.changes.intervals.push({ channelId: this.channelId, flag, since: new Date(open.sinceMs), clearedAt: at, magnitude: open.magnitude, details: open.details });
  }

  /** A flag that opened and cleared entirely inside the batch (an offline gap in a backfill). */
  interval(flag: HealthFlagKind, sinceMs: number, clearedAtMs: number, magnitude: number | null, details: Record<string, unknown>): void {
    this.changes.intervals.push({ channelId: this.channelId, flag, since: new Date(sinceMs), clearedAt: new Date(clearedAtMs), magnitude, details });
  }

  /** Which flags stay open, for the saved state, and the changes to write. */
  finish(): { open: ChannelState["open"]; changes: FlagChanges } {
    const open: ChannelState["open"] = {};
    for (const [flag, c] of this.current) {
      open[flag] = { sinceMs: c.sinceMs };
      // A carried flag whose magnitude nobody touched this batch needs no write.
      if (!c.carried || c.magnitude !== null || Object.keys(c.details).length > 0) {
        this.changes.opens.push({ channelId: this.channelId, flag, since: new Date(c.sinceMs), magnitude: c.magnitude, details: c.details });
      }
    }
    return { open, changes: this.changes };
  }
}

export type ReferenceKind = "bay_floor" | "fixed_target";

/** The distance a channel should read when nothing is in the way, if its asset defines one. */
export function referenceDistance(channel: ChannelConfig, m: Measurement): { kind: ReferenceKind; distanceM: number } | null {
  const asset = channel.asset;
  if (!asset || asset.floorDistanceM === null || m.status !== "ok" || m.distanceM === null) return null;
  if (asset.kind === "point") return { kind: "fixed_target", distanceM: asset.floorDistanceM };
  if (asset.kind === "bay" && m.occupied === false && asset.occupiedBelowM !== null && m.distanceM > asset.occupiedBelowM + PIPELINE_SETTINGS.bayHysteresisM) {
    return { kind: "bay_floor", distanceM: asset.floorDistanceM };
  }
  return null;
}

// k = 0.5, h = 5: the textbook CUSUM design against a 1σ shift (Montgomery §9.1; REFERENCES.md §5).
const DRIFT_K = 0.5;
const DRIFT_H = 5;

function stepDrift(drift: DriftState, residual: number, atMs: number): { drift: DriftState; signal: { direction: "up" | "down"; sinceMs: number; magnitude: number } | null } {
  if (drift.sigma === null) {
    const warmup = [...drift.warmup, roundForState(residual)];
    if (warmup.length < PIPELINE_SETTINGS.driftWarmup) return { drift: { ...drift, warmup }, signal: null };
    const sigma = Math.max(robustSigmaFromDifferences(warmup), PIPELINE_SETTINGS.driftMinSigmaM);
    return { drift: { ...drift, sigma, warmup: [] }, signal: null };
  }
  const chart = createCusum({ mean: 0, sigma: drift.sigma, k: DRIFT_K, h: DRIFT_H }, drift.cusum);
  const step = chart.step(residual);
  const plusStartMs = step.nPlus === 0 ? null : step.nPlus === 1 ? atMs : drift.plusStartMs;
  const minusStartMs = step.nMinus === 0 ? null : step.nMinus === 1 ? atMs : drift.minusStartMs;
  if (step.signal === null) {
    const sinceSignal = drift.sinceSignal === null ? null : drift.sinceSignal + 1;
    return { drift: { ...drift, cusum: chart.state(), plusStartMs, minusStartMs, sinceSignal }, signal: null };
  }
  const kSigma = DRIFT_K * drift.sigma;
  const up = step.signal === "up";
  // New-mean estimate after a signal, μ₀ ± (K + C/N) with μ₀ = 0 (Montgomery §9.1.1).
  const magnitude = up ? kSigma + step.cPlus / step.nPlus : kSigma + step.cMinus / step.nMinus;
  const sinceMs = (up ? plusStartMs : minusStartMs) ?? atMs;
  // Restart the chart after a signal, as the textbook does; the flag stays open while it keeps signalling.
  const reset = { cPlus: 0, cMinus: 0, nPlus: 0, nMinus: 0 };
  return {
    drift: { ...drift, cusum: reset, plusStartMs: null, minusStartMs: null, sinceSignal: 0 },
    signal: { direction: step.signal, sinceMs, magnitude },
  };
}

/** Advances a run counter in place. */
function stepRun(run: RunState, bad: boolean, atMs: number): void {
  if (bad) {
    if (run.count === 0) run.sinceMs = atMs;
    run.count += 1;
    run.good = 0;
  } else {
    run.count = 0;
    run.sinceMs = null;
    run.good += 1;
  }
}

function applyRun(tracker: FlagTracker, flag: "out_of_range" | "no_echo", run: RunState, m: Measurement, channel: ChannelConfig, atMs: number): void {
  const n = PIPELINE_SETTINGS.statusRunLength;
  if (run.count >= n && run.sinceMs !== null) {
    const details =
      flag === "no_echo"
        ? { tof_us: m.tofUs }
        : { status: m.status, distance_m: m.distanceM, min_range_m: channel.minRangeM, max_range_m: channel.maxRangeM };
    tracker.raise(flag, run.sinceMs, run.count, details);
  } else if (run.good === n) tracker.clear(flag, atMs);
}

// Stuck means exactly the same raw value: a live transducer's jitter always moves the last digit of what it sends.
const STUCK_TOLERANCE = 0;

/** Burst spreads when the channel sends bursts, otherwise the jitter of its distances. */
function judgeNoise(tracker: FlagTracker, noisy: ChannelState["noisy"], atMs: number): void {
  const s = PIPELINE_SETTINGS;
  const bySpread = noisy.spreads.length > 0;
  if (!bySpread && noisy.values.length < s.noisyWindow) return;
  const isNoisy = bySpread ? detectNoisy({ spreads: noisy.spreads }, s.noisyChannelSpreadM) : detectNoisy({ values: noisy.values }, s.noisyChannelSigmaM);
  if (!isNoisy) {
    tracker.clear("noisy", atMs);
    return;
  }
  const magnitude = bySpread ? median(noisy.spreads) : robustSigmaFromDifferences(noisy.values);
  tracker.raise("noisy", atMs, magnitude, { measure: bySpread ? "burst_spread_m" : "sigma_m" });
}

export interface ChannelHealthInput {
  channel: ChannelConfig;
  /** The channel's batch, in time order. */
  measurements: readonly Measurement[];
  state: ChannelState;
  /** Set when the cycle's offline check flagged the channel; the first reading clears it. */
  offlineSince: Date | null;
}

export interface ChannelHealth {
  state: ChannelState;
  tracker: FlagTracker;
  clearsOffline: boolean;
}

/** The parts of a state the health stage changes, copied once so the loop can update them in place. */
function ownCopy(state: ChannelState): ChannelState {
  return {
    ...state,
    drift: { ...state.drift, warmup: state.drift.warmup.slice() },
    stuck: { ...state.stuck, values: state.stuck.values.slice() },
    noisy: { spreads: state.noisy.spreads.slice(), values: state.noisy.values.slice() },
    outOfRange: { ...state.outOfRange },
    noEcho: { ...state.noEcho },
    apparentRatios: state.apparentRatios.slice(),
  };
}

function usable(m: Measurement): boolean {
  return m.distanceM !== null && (m.status === "ok" || m.status === "noisy" || m.status === "suspect");
}

/** Streams one channel's batch through the detectors; crosstalk is judged per device afterwards. */
export function assessChannel({ channel, measurements, state, offlineSince }: ChannelHealthInput): ChannelHealth {
  const s = PIPELINE_SETTINGS;
  const tracker = new FlagTracker(channel.id, state.open);
  const intervalS = channel.device.expectedIntervalS;
  const next = ownCopy(state);
  const { stuck, noisy, outOfRange, noEcho, apparentRatios } = next;
  let lastJudgedMs: number | null = null;

  for (const m of measurements) {
    const atMs = m.reading.at.getTime();
    if (next.lastAtMs !== null && atMs > next.lastAtMs && intervalS > 0 && detectOffline(next.lastAtMs, intervalS, atMs)) {
      const sinceMs = next.lastAtMs + 3 * intervalS * 1000;
      tracker.interval("offline", sinceMs, atMs, (atMs - next.lastAtMs) / 1000, { last_seen_at: new Date(next.lastAtMs).toISOString(), expected_interval_s: intervalS });
    }
    if (next.lastAtMs === null || atMs >= next.lastAtMs) {
      next.lastAtMs = atMs;
      next.lastReadingId = m.reading.id;
    }

    // Stuck: the raw value the device sent does not change at all over many readings.
    if (m.rawValue !== null && m.status !== "no_echo" && m.status !== "invalid_value" && m.status !== "invalid_config") {
      const previous = stuck.values.length ? stuck.values[stuck.values.length - 1] : null;
      const same = previous !== null && Math.abs(m.rawValue - previous) <= STUCK_TOLERANCE;
      stuck.runStartMs = same ? (stuck.runStartMs ?? atMs) : atMs;
      stuck.runLength = same ? (stuck.runLength ?? 1) + 1 : 1;
      pushInto(stuck.values, m.rawValue, s.stuckSamples);
      // A run shorter than the window cannot be stuck; only a long one is worth asking detectStuck about.
      if (stuck.runLength >= s.stuckSamples && detectStuck(stuck.values, { minSamples: s.stuckSamples, tolerance: STUCK_TOLERANCE })) {
        tracker.raise("stuck", stuck.runStartMs, stuck.runLength, { value: m.rawValue });
      } else if (!same) tracker.clear("stuck", atMs);
    }

    // Noisy: wide bursts, or a jittery series of distances (judged once the batch is through).
    if (usable(m)) {
      if (m.speedOfSoundMs !== null && m.spreadUs !== null) pushInto(noisy.spreads, roundForState((m.spreadUs * 1e-6 * m.speedOfSoundMs) / 2), s.noisyWindow);
      pushInto(noisy.values, roundForState(m.distanceM as number), s.noisyWindow);
      lastJudgedMs = atMs;
    }

    stepRun(outOfRange, m.status === "too_close" || m.status === "out_of_bounds", atMs);
    applyRun(tracker, "out_of_range", outOfRange, m, channel, atMs);
    stepRun(noEcho, m.status === "no_echo", atMs);
    applyRun(tracker, "no_echo", noEcho, m, channel, atMs);

    // Drift against the reference distance, and the apparent speed of sound over it.
    const reference = referenceDistance(channel, m);
    if (reference !== null) {
      if (m.tofUs !== null && m.tofUs > 0 && m.speedOfSoundMs !== null) {
        // The reference in the sensor's own frame: undo face offset and calibration.
        const rawRef = (reference.distanceM + channel.faceOffsetM - channel.calibrationOffsetM) / channel.calibrationScale;
        if (rawRef > 0) pushInto(apparentRatios, roundForState(apparentSpeedOfSound(rawRef, m.tofUs) / m.speedOfSoundMs), s.apparentSpeedWindow);
      }
      const stepped = stepDrift(next.drift, (m.distanceM as number) - reference.distanceM, atMs);
      next.drift = stepped.drift;
      if (stepped.signal) {
        tracker.raise("drift", stepped.signal.sinceMs, stepped.signal.magnitude, {
          reference: reference.kind,
          reference_distance_m: reference.distanceM,
          direction: stepped.signal.direction,
          detected_at: m.reading.at.toISOString(),
          sigma_m: next.drift.sigma,
          ...apparentSpeedDetails(apparentRatios, m.speedOfSoundMs),
        });
      } else if (next.drift.sinceSignal !== null && next.drift.sinceSignal >= 2 * s.driftWarmup) {
        tracker.clear("drift", atMs);
      }
    }
  }

  if (lastJudgedMs !== null) judgeNoise(tracker, noisy, lastJudgedMs);
  return { state: next, tracker, clearsOffline: offlineSince !== null && measurements.length > 0 };
}

/** Median apparent/expected speed-of-sound ratio and the air temperature it implies (dry-air formula inverted). */
export function apparentSpeedDetails(ratios: readonly number[], expectedMs: number | null): Record<string, number> {
  if (ratios.length === 0 || expectedMs === null) return {};
  const ratio = median(ratios);
  const apparentMs = ratio * expectedMs;
  return { apparent_speed_ms: apparentMs, expected_speed_ms: expectedMs, speed_ratio: ratio, apparent_temp_c: 273.15 * ((apparentMs / 331.3) ** 2 - 1) };
}

export interface DevicePings {
  /** Channel index → ping times (epoch ms) in this batch, plus each channel's last ping before it. */
  pings: Record<number, number[]>;
  channelIds: Record<number, string>;
}

/** Crosstalk risk for one device: each channel of a pair pinged too close together is flagged with its closest gap. */
export function assessCrosstalk({ pings, channelIds }: DevicePings, trackers: ReadonlyMap<string, FlagTracker>): void {
  const closest = new Map<number, { gapMs: number; other: number }>();
  for (const p of detectCrosstalk(pings, PIPELINE_SETTINGS.crosstalkGapMs)) {
    for (const [self, other] of [[p.channelA, p.channelB], [p.channelB, p.channelA]] as const) {
      const seen = closest.get(self);
      if (!seen || p.minGapMs < seen.gapMs) closest.set(self, { gapMs: p.minGapMs, other });
    }
  }
  for (const [self, { gapMs, other }] of closest) {
    const tracker = trackers.get(channelIds[self]);
    const times = pings[self] ?? [];
    if (tracker && times.length) {
      tracker.raise("crosstalk_risk", Math.min(...times), gapMs, { with_channel_index: other, with_channel_id: channelIds[other] ?? null, min_gap_ms: gapMs });
    }
  }
  const active = Object.keys(pings).map(Number).filter((i) => (pings[i] ?? []).length > 0);
  if (active.length < 2) return;
  for (const index of active) {
    if (closest.has(index)) continue;
    const tracker = trackers.get(channelIds[index]);
    if (tracker?.isOpen("crosstalk_risk")) tracker.clear("crosstalk_risk", Math.max(...pings[index]));
  }
}
