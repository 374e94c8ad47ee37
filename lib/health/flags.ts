// Sensor-health detectors over a channel's recent values. Each is pure; the worker decides which
// channels to ask (e.g. "stuck" only for a tank that is being drawn or filled).

import { median, robustSigmaFromDifferences } from "../signal/robust-stats";

/** The sensor-health flags a channel can carry (the worker's health stage raises them, alarms follow them). */
export const HEALTH_FLAGS = ["drift", "stuck", "noisy", "offline", "crosstalk_risk", "out_of_range", "no_echo"] as const;
export type HealthFlagKind = (typeof HEALTH_FLAGS)[number];

export interface StuckOptions {
  /** Length of the unchanging run, ending at the latest value, that counts as stuck. */
  minSamples: number;
  /** Largest max − min inside the run still taken as "no change" (e.g. one reading step). */
  tolerance: number;
}

/** True when the latest minSamples values all lie within a band of width tolerance. */
export function detectStuck(values: readonly number[], { minSamples, tolerance }: StuckOptions): boolean {
  if (!Number.isInteger(minSamples) || minSamples < 2) throw new RangeError("minSamples must be an integer ≥ 2");
  if (values.length < minSamples) return false;
  const run = values.slice(-minSamples);
  return Math.max(...run) - Math.min(...run) <= tolerance;
}

export type NoiseInput =
  /** Spread of each reading's burst of pings (e.g. max − min or MAD of samples_us, as distance). */
  | { spreads: readonly number[] }
  /** The channel's successive values. */
  | { values: readonly number[] };

/**
 * True when the channel is noisy beyond threshold. With burst spreads: their median exceeds it, so
 * one bad burst does not flag. With values: the robust σ of successive differences exceeds it, which
 * a steady draw-down or a single step does not inflate. Too little data (no spread, fewer than 3
 * values) is not noisy.
 */
export function detectNoisy(input: NoiseInput, threshold: number): boolean {
  if ("spreads" in input) {
    return input.spreads.length > 0 && median(input.spreads) > threshold;
  }
  return input.values.length >= 3 && robustSigmaFromDifferences(input.values) > threshold;
}

// The product's rule: a channel is offline after 3 expected reporting intervals without a reading.
const OFFLINE_INTERVALS = 3;

function toMs(t: Date | number): number {
  return t instanceof Date ? t.getTime() : t;
}

/** True when nothing has been seen for more than 3 expected intervals (or never). */
export function detectOffline(lastSeen: Date | number | null, expectedIntervalS: number, now: Date | number): boolean {
  if (!(expectedIntervalS > 0)) throw new RangeError("expectedIntervalS must be positive");
  if (lastSeen === null) return true;
  return toMs(now) - toMs(lastSeen) > OFFLINE_INTERVALS * expectedIntervalS * 1000;
}

export interface CrosstalkPair {
  channelA: number;
  channelB: number;
  /** Smallest gap found between a ping of A and a ping of B. */
  minGapMs: number;
}

/**
 * Pairs of channels on one device pinged closer together than minGapMs, so one transducer can hear
 * the other's echo. 60 ms between pings is common practice for these sensors. Keys are channel
 * indices; pairs come sorted by channel.
 */
export function detectCrosstalk(
  pingTimesByChannel: Readonly<Record<number, readonly (Date | number)[]>>,
  minGapMs = 60,
): CrosstalkPair[] {
  const pings = Object.entries(pingTimesByChannel)
    .flatMap(([channel, times]) => times.map((t) => ({ channel: Number(channel), t: toMs(t) })))
    .sort((a, b) => a.t - b.t);
  const closest = new Map<string, CrosstalkPair>();
  for (let i = 0; i < pings.length; i++) {
    for (let j = i + 1; j < pings.length && pings[j].t - pings[i].t < minGapMs; j++) {
      if (pings[i].channel === pings[j].channel) continue;
      const a = Math.min(pings[i].channel, pings[j].channel);
      const b = Math.max(pings[i].channel, pings[j].channel);
      const gap = pings[j].t - pings[i].t;
      const key = `${a}:${b}`;
      const seen = closest.get(key);
      if (seen === undefined || gap < seen.minGapMs) closest.set(key, { channelA: a, channelB: b, minGapMs: gap });
    }
  }
  return [...closest.values()].sort((p, q) => p.channelA - q.channelA || p.channelB - q.channelB);
}

/**
 * Apparent speed of sound from a target at a known distance: c = 2·d_ref / t (t is the round trip).
 * Compared with c(T), it separates a temperature error from a drifting transducer or timer.
 */
export function apparentSpeedOfSound(referenceDistanceM: number, tofUs: number): number {
  if (!(referenceDistanceM > 0)) throw new RangeError("referenceDistanceM must be positive");
  if (!(tofUs > 0)) throw new RangeError("tofUs must be positive");
  return (2 * referenceDistanceM) / (tofUs * 1e-6);
}
