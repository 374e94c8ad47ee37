// Level alarm conditions: HH/H/L/LL setpoints with deadband and on-delay, a rate-of-change limit
// for leaks and theft, and validation of a setpoint set against the tank. Levels in metres.

import { theilSenSlope } from "../signal/robust-stats";
import { type AlarmPriority, type Instant, instantToMs } from "./state-machine";

export const SETPOINT_KEYS = ["ll", "l", "h", "hh"] as const;
export type SetpointKey = (typeof SETPOINT_KEYS)[number];

const SETPOINT_LABELS: Record<SetpointKey, string> = { ll: "LL", l: "L", h: "H", hh: "HH" };

/** Level deadband as a percentage of span (REFERENCES.md §4: level 5 %, some sources 2; published, sources differ). */
export const LEVEL_DEADBAND_PCT_OF_SPAN = 5;
/** On-delay for level alarms in seconds (REFERENCES.md §4: level 60 s, from memory). */
export const LEVEL_ON_DELAY_S = 60;

/** The deadband in metres for a level span (usually the tank height), at a percentage of it. */
export function levelDeadbandM(spanM: number, pctOfSpan = LEVEL_DEADBAND_PCT_OF_SPAN): number {
  if (!(spanM > 0)) throw new RangeError("span must be positive");
  return (spanM * pctOfSpan) / 100;
}

export interface SetpointConfig {
  /** Setpoint in metres of level. */
  value: number;
  /** Metres the level must move back past the setpoint before the condition clears. */
  deadband: number;
  /** Seconds the level must stay at or beyond the setpoint before the condition becomes active. */
  onDelayS: number;
  priority: AlarmPriority;
  enabled: boolean;
}

export interface SetpointDef extends SetpointConfig {
  /** hh and h alarm on a high level, l and ll on a low level. */
  key: SetpointKey;
}

/** What evaluateSetpoint carries from one sample to the next (plain numbers: storable as JSON). */
export interface SetpointState {
  active: boolean;
  /** Epoch ms of the first sample of the current uninterrupted run at or beyond the setpoint, while waiting out the on-delay. */
  pendingSinceMs: number | null;
  /** Epoch ms of the last sample taken into account. */
  lastAtMs: number | null;
}

export interface LevelSample {
  at: Instant;
  value: number;
}

export interface SetpointEvaluation {
  active: boolean;
  /** The condition switched (became active or cleared) with this sample. */
  changed: boolean;
  state: SetpointState;
  /** Why the sample was not used: older than the last one, or not a finite number. */
  ignored: "out_of_order" | "invalid_value" | null;
}

export function initialSetpointState(): SetpointState {
  return { active: false, pendingSinceMs: null, lastAtMs: null };
}

export function isHighSetpoint(key: SetpointKey): boolean {
  return key === "h" || key === "hh";
}

/**
 * Evaluates one setpoint against one sample. High setpoints: the level is in alarm at or above the
 * value and clears only below value − deadband; low setpoints: at or below the value, clearing only
 * above value + deadband. Activation needs every sample for onDelayS to be at or beyond the value:
 * a sample back inside restarts the delay. The condition is judged at samples only, so a gap
 * between two samples beyond the setpoint counts as holding. A disabled setpoint is never active.
 */
export function evaluateSetpoint(def: SetpointDef, state: SetpointState, sample: LevelSample): SetpointEvaluation {
  const atMs = instantToMs(sample.at);
  if (state.lastAtMs !== null && atMs < state.lastAtMs) {
    return { active: state.active, changed: false, state, ignored: "out_of_order" };
  }
  if (!Number.isFinite(sample.value)) return { active: state.active, changed: false, state, ignored: "invalid_value" };
  if (!def.enabled) {
    const next: SetpointState = { active: false, pendingSinceMs: null, lastAtMs: atMs };
    return { active: false, changed: state.active, state: next, ignored: null };
  }

  const high = isHighSetpoint(def.key);
  const beyond = high ? sample.value >= def.value : sample.value <= def.value;
  if (state.active) {
    const cleared = high ? sample.value < def.value - def.deadband : sample.value > def.value + def.deadband;
    const next: SetpointState = { active: !cleared, pendingSinceMs: null, lastAtMs: atMs };
    return { active: next.active, changed: cleared, state: next, ignored: null };
  }
  if (!beyond) {
    return { active: false, changed: false, state: { active: false, pendingSinceMs: null, lastAtMs: atMs }, ignored: null };
  }
  const pendingSinceMs = state.pendingSinceMs ?? atMs;
  const active = atMs - pendingSinceMs >= def.onDelayS * 1000;
  const next: SetpointState = { active, pendingSinceMs: active ? null : pendingSinceMs, lastAtMs: atMs };
  return { active, changed: active, state: next, ignored: null };
}

export type LevelSetpoints = Partial<Record<SetpointKey, SetpointConfig>>;
export type LevelSetpointStates = Partial<Record<SetpointKey, SetpointState>>;

/** Evaluates every configured setpoint of an asset on one sample; a missing state starts fresh. */
export function evaluateLevelSetpoints(
  setpoints: LevelSetpoints,
  states: LevelSetpointStates,
  sample: LevelSample,
): Partial<Record<SetpointKey, SetpointEvaluation>> {
  const out: Partial<Record<SetpointKey, SetpointEvaluation>> = {};
  for (const key of SETPOINT_KEYS) {
    const config = setpoints[key];
    if (config) out[key] = evaluateSetpoint({ ...config, key }, states[key] ?? initialSetpointState(), sample);
  }
  return out;
}

export interface RateOfChangeOptions {
  /** Trailing window [newest − windowS, newest], seconds. Halftrip's default: 3600. */
  windowS?: number;
  /** The samples used must span at least this long, seconds. Halftrip's default: 1800. */
  minSpanS?: number;
  /** At least this many samples in the window. Halftrip's default: 6. */
  minSamples?: number;
}

export interface RateOfChangeEvaluation {
  /** insufficient_data: too few samples or too short a span for a slope worth acting on. */
  status: "ok" | "insufficient_data";
  /** The level falls faster than the limit. */
  active: boolean;
  /** Theil–Sen slope of level over time in m/h (negative when falling), null without enough data. */
  slopeMPerH: number | null;
  limitMPerH: number;
  samplesUsed: number;
  spanS: number;
}

const MS_PER_HOUR = 3_600_000;

/**
 * Leak or theft detection: active when the level falls faster than limitMPerH (a positive rate).
 * The slope is Theil–Sen (the median of all pairwise slopes) over a trailing window, not the change
 * between the first and last samples nor least squares: ultrasonic levels carry spikes (a false
 * echo, a splash, a stray reading) and ripple, and an end-to-end difference moves with a single bad
 * end sample while least squares follows any outlier; the median of pairwise slopes ignores up to
 * about 29 % bad samples. The minimum span keeps ordinary ripple over a few minutes from reading as
 * a steep slope. Rising levels (refills) never activate it. Cost grows with the square of the
 * number of samples in the window.
 */
export function evaluateRateOfChange(
  samples: readonly LevelSample[],
  limitMPerH: number,
  options: RateOfChangeOptions = {},
): RateOfChangeEvaluation {
  if (!(limitMPerH > 0)) throw new RangeError("the rate-of-change limit must be a positive number of m/h");
  const windowS = options.windowS ?? 3600;
  const minSpanS = options.minSpanS ?? 1800;
  const minSamples = options.minSamples ?? 6;

  const points = samples
    .filter((s) => Number.isFinite(s.value))
    .map((s) => ({ x: instantToMs(s.at), y: s.value }));
  const newest = points.reduce((max, p) => Math.max(max, p.x), -Infinity);
  const windowed = points.filter((p) => p.x >= newest - windowS * 1000);
  const oldest = windowed.reduce((min, p) => Math.min(min, p.x), newest);
  const spanS = windowed.length === 0 ? 0 : (newest - oldest) / 1000;
  const insufficient: RateOfChangeEvaluation = {
    status: "insufficient_data",
    active: false,
    slopeMPerH: null,
    limitMPerH,
    samplesUsed: windowed.length,
    spanS,
  };
  if (windowed.length < Math.max(2, minSamples) || spanS < minSpanS) return insufficient;
  const fit = theilSenSlope(windowed);
  if (!fit) return insufficient;
  const slopeMPerH = fit.slope * MS_PER_HOUR;
  return { status: "ok", active: slopeMPerH < -limitMPerH, slopeMPerH, limitMPerH, samplesUsed: windowed.length, spanS };
}

export type SetpointValues = Partial<Record<SetpointKey, number | null>>;

export interface SetpointValidation {
  ok: boolean;
  /** One message per field, for the form beside that field. */
  fieldErrors: Partial<Record<SetpointKey, string>>;
}

function metres(v: number): string {
  return `${Number(v.toFixed(3))} m`;
}

/**
 * Checks a set of setpoints (metres of level; null or absent = not used): each inside 0…tank height
 * (inclusive), and LL < L < H < HH among those that are set. An ordering fault is reported on both
 * fields of the pair, each message naming the other.
 */
export function validateSetpoints(values: SetpointValues, tankHeightM: number): SetpointValidation {
  if (!(tankHeightM > 0)) throw new RangeError("tank height must be positive");
  const fieldErrors: Partial<Record<SetpointKey, string>> = {};
  const set: { key: SetpointKey; value: number }[] = [];
  for (const key of SETPOINT_KEYS) {
    const v = values[key];
    if (v === null || v === undefined) continue;
    if (!Number.isFinite(v)) {
      fieldErrors[key] = `${SETPOINT_LABELS[key]} must be a number of metres.`;
      continue;
    }
    if (v < 0 || v > tankHeightM) {
      fieldErrors[key] = `${SETPOINT_LABELS[key]} must be between 0 m and the tank height (${metres(tankHeightM)}).`;
    }
    set.push({ key, value: v });
  }
  for (let i = 1; i < set.length; i++) {
    const lower = set[i - 1];
    const upper = set[i];
    if (lower.value < upper.value) continue;
    fieldErrors[lower.key] ??= `${SETPOINT_LABELS[lower.key]} must be below ${SETPOINT_LABELS[upper.key]} (${metres(upper.value)}).`;
    fieldErrors[upper.key] ??= `${SETPOINT_LABELS[upper.key]} must be above ${SETPOINT_LABELS[lower.key]} (${metres(lower.value)}).`;
  }
  return { ok: Object.keys(fieldErrors).length === 0, fieldErrors };
}
