// The alarm engine: turns measured levels, health flags and people's actions into state changes of
// stored alarms, each change with the event that records it. Pure: the worker and the API load the
// alarm, call these functions and write back what they return.
//
// It composes the condition evaluators of ./setpoints (deadband, on-delay, rate of change) with the
// ISA-18.2 reducer of ./state-machine and adds what an alarm needs to be stored and notified: when
// its current occurrence began and cleared, how many times it activated, and its episode — a count
// that advances each time the alarm newly needs someone's attention, so notifications and escalation
// belong to one episode and a re-alarm before anyone acknowledged does not start another round.

import { HEALTH_FLAGS, type HealthFlagKind } from "../health/flags";
import {
  type LevelSample,
  type SetpointDef,
  type SetpointKey,
  type SetpointState,
  SETPOINT_KEYS,
  evaluateRateOfChange,
  evaluateSetpoint,
  initialSetpointState,
  isHighSetpoint,
} from "./setpoints";
import {
  type AlarmEventKind,
  type AlarmInput,
  type AlarmPriority,
  type AlarmSnapshot,
  type AlarmState,
  type AlarmActionError,
  type Instant,
  instantToMs,
  transitionAlarm,
} from "./state-machine";

/**
 * device_offline: one alarm per device that fell silent or lost every channel (./consequential);
 * common_cause: one alarm for many channels flagged alike at once (a device's or a site's), its
 * members listed in its cause.
 */
export const ALARM_KINDS = [...SETPOINT_KEYS, "rate_of_change", ...HEALTH_FLAGS, "device_offline", "common_cause"] as const;
export type AlarmKind = (typeof ALARM_KINDS)[number];

export function isAlarmKind(value: string): value is AlarmKind {
  return (ALARM_KINDS as readonly string[]).includes(value);
}

export function isLevelAlarmKind(kind: AlarmKind): kind is SetpointKey {
  return (SETPOINT_KEYS as readonly string[]).includes(kind);
}

const KIND_LABELS: Record<AlarmKind, string> = {
  hh: "HH level",
  h: "H level",
  l: "L level",
  ll: "LL level",
  rate_of_change: "Level falling fast",
  drift: "Sensor drift",
  stuck: "Sensor stuck",
  noisy: "Sensor noisy",
  offline: "Channel offline",
  crosstalk_risk: "Crosstalk risk",
  out_of_range: "Reading out of range",
  no_echo: "No echo",
  device_offline: "Device offline",
  common_cause: "Common cause",
};

/** The condition in words, as screens and e-mails name it. */
export function alarmKindLabel(kind: AlarmKind): string {
  return KIND_LABELS[kind];
}

/**
 * Priorities an alarm gets when nobody chose one. Halftrip's own defaults: the outer setpoints and a
 * fast fall (a leak or a theft) call for a quick answer; a sensor fault is a maintenance job, except a
 * device that has gone silent, which leaves its tanks unwatched.
 */
export const DEFAULT_PRIORITIES: Record<AlarmKind, AlarmPriority> = {
  hh: "high",
  h: "medium",
  l: "medium",
  ll: "high",
  rate_of_change: "high",
  drift: "low",
  stuck: "low",
  noisy: "low",
  offline: "medium",
  crosstalk_risk: "low",
  out_of_range: "low",
  no_echo: "low",
  device_offline: "medium",
  common_cause: "low",
};

/** The caution PRODUCT.md asks for on every screen and e-mail with tank alarms. */
export const ALARM_CAUTION =
  "Halftrip raises operational alarms only; it is not an overfill-prevention or safety system. Follow API 2350 / IEC 61511, local codes and licensed practice for overfill protection and safety functions.";

/** What is stored about an alarm besides its ISA-18.2 snapshot. */
export interface AlarmRecord {
  snapshot: AlarmSnapshot;
  priority: AlarmPriority;
  episode: number;
  activations: number;
  /** ISO instants of the current occurrence; null before the first one. */
  activatedAt: string | null;
  clearedAt: string | null;
  value: number | null;
  setpoint: number | null;
  lastChangeAt: string | null;
}

export interface EngineEvent {
  at: string;
  kind: AlarmEventKind;
  fromState: AlarmState;
  toState: AlarmState;
  cause: string;
  value: number | null;
  setpoint: number | null;
  priority: AlarmPriority;
  episode: number;
}

/** The condition turned active or clear at a moment, with why. */
export interface ConditionChange {
  at: Instant;
  active: boolean;
  value: number | null;
  setpoint: number | null;
  cause: string;
}

export interface EngineResult {
  record: AlarmRecord;
  events: EngineEvent[];
}

export function newAlarmRecord(priority: AlarmPriority, latching = false): AlarmRecord {
  return {
    snapshot: { state: "normal", conditionActive: false, latching, shelvedUntil: null },
    priority,
    episode: 0,
    activations: 0,
    activatedAt: null,
    clearedAt: null,
    value: null,
    setpoint: null,
    lastChangeAt: null,
  };
}

const ACTIVATION_EVENTS: readonly AlarmEventKind[] = ["activated", "re_alarmed"];
const CLEARING_EVENTS: readonly AlarmEventKind[] = ["returned_to_normal", "cleared_while_latched", "condition_cleared_logged"];

export interface InputMeta {
  at: Instant;
  cause: string;
  value?: number | null;
  setpoint?: number | null;
}

/**
 * Applies one input (a condition change or an action) to a stored alarm. An action the state does not
 * allow comes back as the reducer's error, with nothing changed; an input that changes nothing gives
 * no event.
 */
export function applyAlarmInput(record: AlarmRecord, input: AlarmInput, meta: InputMeta): { ok: true; result: EngineResult } | AlarmActionError {
  const t = transitionAlarm(record.snapshot, input);
  if (!t.ok) return t;
  if (!t.changed || t.eventKind === null) return { ok: true, result: { record, events: [] } };
  const at = new Date(instantToMs(meta.at)).toISOString();
  const from = record.snapshot.state;
  const next: AlarmRecord = { ...record, snapshot: t.next, lastChangeAt: at };
  // A new episode: the alarm newly needs attention, unless it was still waiting for an acknowledgement.
  const newEpisode = t.annunciated && from !== "returned_unacknowledged";
  if (newEpisode) next.episode = record.episode + 1;
  if (ACTIVATION_EVENTS.includes(t.eventKind) || newEpisode) {
    next.activatedAt = at;
    next.clearedAt = null;
  }
  if (ACTIVATION_EVENTS.includes(t.eventKind)) next.activations = record.activations + 1;
  if (CLEARING_EVENTS.includes(t.eventKind)) next.clearedAt = at;
  if (meta.value !== undefined) next.value = meta.value;
  if (meta.setpoint !== undefined) next.setpoint = meta.setpoint;
  const event: EngineEvent = {
    at,
    kind: t.eventKind,
    fromState: from,
    toState: t.next.state,
    cause: meta.cause,
    value: meta.value ?? null,
    setpoint: meta.setpoint ?? null,
    priority: record.priority,
    episode: next.episode,
  };
  return { ok: true, result: { record: next, events: [event] } };
}

/** Applies condition changes in time order; each that changes the alarm leaves one event. */
export function applyConditionChanges(record: AlarmRecord, changes: readonly ConditionChange[]): EngineResult {
  let current = record;
  const events: EngineEvent[] = [];
  const sorted = [...changes].sort((a, b) => instantToMs(a.at) - instantToMs(b.at));
  for (const c of sorted) {
    const applied = applyAlarmInput(current, { type: c.active ? "condition_active" : "condition_cleared" }, c);
    // Condition inputs never fail (state-machine.ts); the guard keeps the types honest.
    if (!applied.ok) continue;
    current = applied.result.record;
    events.push(...applied.result.events);
  }
  return { record: current, events };
}

function metres(v: number): string {
  return `${v.toFixed(3)} m`;
}

const SETPOINT_LABELS: Record<SetpointKey, string> = { hh: "HH", h: "H", l: "L", ll: "LL" };

/** Why a setpoint's condition became active or cleared, in words for the event log. */
export function describeSetpointChange(def: SetpointDef, active: boolean, value: number): string {
  const name = SETPOINT_LABELS[def.key];
  const high = isHighSetpoint(def.key);
  if (active) {
    const delay = def.onDelayS > 0 ? ` for ${def.onDelayS} s` : "";
    return `level ${metres(value)} ${high ? "≥" : "≤"} ${name} ${metres(def.value)}${delay}`;
  }
  if (!def.enabled) return `${name} setpoint disabled`;
  const limit = high ? def.value - def.deadband : def.value + def.deadband;
  return `level ${metres(value)} ${high ? "<" : ">"} ${name} ${metres(def.value)} ${high ? "−" : "+"} deadband ${metres(def.deadband)} = ${metres(limit)}`;
}

export interface LevelEvaluation extends EngineResult {
  state: SetpointState;
  /** Samples taken into account (later than the stored state). */
  samplesUsed: number;
}

/**
 * Runs one setpoint over new level samples (any order; those not later than the stored state are
 * skipped, so running a batch twice changes nothing) and applies each switch of its condition.
 */
export function evaluateLevelAlarm(
  def: SetpointDef,
  record: AlarmRecord,
  state: SetpointState | null,
  samples: readonly LevelSample[],
): LevelEvaluation {
  let s = state ?? initialSetpointState();
  const changes: ConditionChange[] = [];
  let used = 0;
  const sorted = [...samples].sort((a, b) => instantToMs(a.at) - instantToMs(b.at));
  for (const sample of sorted) {
    if (s.lastAtMs !== null && instantToMs(sample.at) <= s.lastAtMs) continue;
    const r = evaluateSetpoint(def, s, sample);
    if (r.ignored) continue;
    used++;
    s = r.state;
    if (r.changed) changes.push({ at: sample.at, active: r.active, value: sample.value, setpoint: def.value, cause: describeSetpointChange(def, r.active, sample.value) });
  }
  return { ...applyConditionChanges(record, changes), state: s, samplesUsed: used };
}

/** Rate-of-change alarm settings of a tank (limit as a positive rate of fall). */
export interface RateAlarmDef {
  limitMPerH: number;
  enabled: boolean;
}

/** The rate-of-change evaluator's memory between batches. */
export interface RateAlarmState {
  lastEvalAtMs: number | null;
  active: boolean;
}

export function initialRateAlarmState(): RateAlarmState {
  return { lastEvalAtMs: null, active: false };
}

export const RATE_ALARM_SETTINGS = {
  /** Trailing window of the slope, and the span and count it needs (the defaults of evaluateRateOfChange). */
  windowS: 3600,
  minSpanS: 1800,
  minSamples: 6,
  /** Evaluate at most this often, so a fast channel does not recompute the slope at every ping. */
  everyS: 60,
  /**
   * A fall faster than the limit activates; the condition clears once the fall is slower than this
   * share of the limit — a deadband on the rate so a slope hovering at the limit does not chatter
   * (Halftrip's own choice, in the spirit of the level deadband of REFERENCES.md §4).
   */
  clearShare: 0.8,
} as const;

/**
 * Runs the leak/theft check over new samples. `history` holds the samples before the new ones
 * (at least the trailing window); the slope is re-evaluated at new samples at most every `everyS`.
 */
export function evaluateRateAlarm(
  def: RateAlarmDef,
  record: AlarmRecord,
  state: RateAlarmState | null,
  history: readonly LevelSample[],
  samples: readonly LevelSample[],
): EngineResult & { state: RateAlarmState } {
  let s = state ?? initialRateAlarmState();
  const changes: ConditionChange[] = [];
  const all = [...history, ...samples]
    .map((p) => ({ atMs: instantToMs(p.at), value: p.value }))
    .filter((p) => Number.isFinite(p.value))
    .sort((a, b) => a.atMs - b.atMs);
  const fresh = samples.map((p) => instantToMs(p.at)).sort((a, b) => a - b);
  const limit = -def.limitMPerH;
  let lo = 0;
  let hi = 0;
  for (const tMs of fresh) {
    if (s.lastEvalAtMs !== null && tMs < s.lastEvalAtMs + RATE_ALARM_SETTINGS.everyS * 1000) continue;
    if (!def.enabled) {
      if (s.active) changes.push({ at: tMs, active: false, value: null, setpoint: limit, cause: "rate-of-change alarm disabled" });
      s = { lastEvalAtMs: tMs, active: false };
      continue;
    }
    while (hi < all.length && all[hi].atMs <= tMs) hi++;
    while (lo < hi && all[lo].atMs < tMs - RATE_ALARM_SETTINGS.windowS * 1000) lo++;
    const window = all.slice(lo, hi).map((p) => ({ at: p.atMs, value: p.value }));
    const r = evaluateRateOfChange(window, def.limitMPerH, RATE_ALARM_SETTINGS);
    s = { ...s, lastEvalAtMs: tMs };
    if (r.status !== "ok" || r.slopeMPerH === null) continue;
    const slope = r.slopeMPerH;
    if (!s.active && r.active) {
      s = { ...s, active: true };
      changes.push({ at: tMs, active: true, value: slope, setpoint: limit, cause: `level falling ${(-slope).toFixed(3)} m/h, faster than the limit ${def.limitMPerH} m/h` });
    } else if (s.active && slope >= limit * RATE_ALARM_SETTINGS.clearShare) {
      s = { ...s, active: false };
      changes.push({
        at: tMs,
        active: false,
        value: slope,
        setpoint: limit,
        cause: `level changing ${slope.toFixed(3)} m/h, slower than ${RATE_ALARM_SETTINGS.clearShare * 100} % of the limit`,
      });
    }
  }
  return { ...applyConditionChanges(record, changes), state: s };
}

/** A health flag as stored: when it opened and (when it has) cleared. */
export interface FlagInterval {
  since: Instant;
  clearedAt: Instant | null;
  magnitude: number | null;
}

/**
 * The condition changes a health-flag alarm has not seen yet: each interval's opening and clearing
 * later than `evaluatedUntilMs`, in time order. Overlapping rows are merged by the reducer (a second
 * opening while active changes nothing).
 */
export function healthFlagChanges(
  flag: HealthFlagKind,
  intervals: readonly FlagInterval[],
  evaluatedUntilMs: number | null,
  conditionActive = false,
): ConditionChange[] {
  const label = alarmKindLabel(flag).toLowerCase();
  const changes: ConditionChange[] = [];
  const ordered = [...intervals].sort((a, b) => instantToMs(a.since) - instantToMs(b.since));
  for (const i of ordered) {
    const sinceMs = instantToMs(i.since);
    if (evaluatedUntilMs === null || sinceMs > evaluatedUntilMs) {
      changes.push({ at: sinceMs, active: true, value: i.magnitude, setpoint: null, cause: `${label} flag raised by the worker` });
    }
    if (i.clearedAt !== null) {
      const clearedMs = instantToMs(i.clearedAt);
      // A flag the worker withdraws (late readings showed no outage) clears at the instant it opened, which
      // is where the alarm's evaluation stopped: an alarm still active must take that clear too.
      if (evaluatedUntilMs === null || clearedMs > evaluatedUntilMs || (conditionActive && clearedMs === evaluatedUntilMs)) {
        changes.push({ at: clearedMs, active: false, value: i.magnitude, setpoint: null, cause: `${label} flag cleared by the worker` });
      }
    }
  }
  // A stable sort keeps an interval's opening before its clearing, and a clearing before the next opening at the same instant.
  return changes.sort((a, b) => instantToMs(a.at) - instantToMs(b.at));
}

/** Shelved alarms whose expiry has passed return by themselves: the input the worker applies. */
export function shelveExpiry(record: AlarmRecord, now: Instant): EngineResult | null {
  if (record.snapshot.state !== "shelved" || record.snapshot.shelvedUntil === null) return null;
  if (instantToMs(now) < instantToMs(record.snapshot.shelvedUntil)) return null;
  const applied = applyAlarmInput(record, { type: "shelve_expired", at: now }, { at: record.snapshot.shelvedUntil, cause: "shelve expired" });
  return applied.ok ? applied.result : null;
}

/** Longest a shelve may last (ISA-18.2 asks for a time limit; 24 h is the default maximum). */
export const MAX_SHELVE_HOURS = 24;

/** The states in which an alarm waits for someone to acknowledge it. */
export function needsAcknowledgement(state: AlarmState): boolean {
  return state === "unacknowledged" || state === "returned_unacknowledged";
}
