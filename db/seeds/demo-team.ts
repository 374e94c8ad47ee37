import { type AlarmKind, type AlarmRecord, type ConditionChange, type EngineEvent, applyAlarmInput, evaluateLevelAlarm, MAX_SHELVE_HOURS, newAlarmRecord } from "../../lib/alarms/engine";
import type { SetpointDef, SetpointKey, SetpointState } from "../../lib/alarms/setpoints";
import type { AlarmInput, AlarmPriority } from "../../lib/alarms/state-machine";
import { localHour } from "../../workers/simulation/climate";
import { levelForFillPct, scenarioFillPct } from "../../workers/simulation/tank-usage";
import { gaussianAt, seedFromText, uniformAt } from "../../workers/simulation/random";
import { DEMO_ON_CALL } from "./demo-accounts";
import type { DemoTank } from "./demo-plan";

// Demo scenario only: how the invented water cooperative's team answers its alarms over the 30 days
// of history, so the alarm pages show people at work rather than a pile nobody touched. Pure and
// deterministic (every draw is a hash of the alarm and its time): the seed replays it through the
// engine at the times it plans. The habits are invented, shaped after common practice in control
// rooms: an urgent alarm is acknowledged within minutes, a low one within the hour, slower at night
// when the technician is called from home; sensor faults that wait for a site visit are shelved with
// the visit as the reason; the last hour's alarms are still waiting, as they would be on any desk.

const MINUTE_MS = 60_000;
const HOUR_MS = 60 * MINUTE_MS;

/** Median minutes to acknowledge by priority by day (demo habits). */
const MEDIAN_ACK_MIN: Record<AlarmPriority, number> = { critical: 2, high: 4, medium: 9, low: 20 };
/** Spread of the log-normal delay (σ of ln minutes): p90 ≈ median × 2.8. */
const ACK_SIGMA = 0.8;
/** At night (22:00–06:00 site time) people take this much longer. */
const NIGHT_FACTOR = 2.5;
/** Alarms raised this recently before the seed are left for the visitor. */
export const DEMO_FRESH_MINUTES = 45;

/** Sensor faults that wait for a visit: shelved by the technician with the visit as the reason. */
const SHELVED_KINDS: Partial<Record<AlarmKind, string>> = {
  crosstalk_risk: "channel spacing goes to 80 ms with the next firmware push; nuisance until then",
  stuck: "transducer face iced or fouled; site visit booked",
  drift: "reference target to be re-surveyed on the next car-park round",
};

const COMMENTS: Partial<Record<AlarmKind, readonly string[]>> = {
  l: ["Delivery ordered.", "Supplier confirmed a slot.", "Checked the dip, agrees with the gauge."],
  ll: ["Supplier chased; dosing pump on reduced stroke meanwhile."],
  h: ["Fill valve closed by hand.", "Delivery driver told to stop."],
  hh: ["Transfer stopped; site informed."],
  rate_of_change: ["Walked the line, no leak found; draw-off for flushing."],
  offline: ["Link flaky again; it came back on its own."],
  device_offline: ["Upland radio link down again; logged with the carrier.", "Back by itself; antenna check on the next visit."],
  noisy: ["Rain on the sump lid; watching."],
  no_echo: ["Foam on the surface after the wash cycle."],
  out_of_range: ["Level above the blanking distance during the refill."],
};

export interface DemoEpisode {
  /** Identifies the alarm in the seed (asset key + kind, channel + flag…). */
  alarmKey: string;
  kind: AlarmKind;
  priority: AlarmPriority;
  timeZone: string;
  activatedAtMs: number;
  clearedAtMs: number | null;
}

export interface TeamAction {
  alarmKey: string;
  atMs: number;
  actor: string;
  input: AlarmInput;
  comment: string | null;
  /** The shelve's reason. */
  reason: string | null;
}

function isNight(tMs: number, timeZone: string): boolean {
  const h = localHour(tMs, timeZone);
  return h >= 22 || h < 6;
}

/** Minutes from activation to acknowledgement for one episode (log-normal around the priority's median). */
export function ackDelayMinutes(e: DemoEpisode): number {
  const z = gaussianAt(seedFromText(e.alarmKey), e.activatedAtMs, 1);
  const night = isNight(e.activatedAtMs, e.timeZone) && e.priority !== "critical" ? NIGHT_FACTOR : 1;
  return Math.max(0.5, MEDIAN_ACK_MIN[e.priority] * night * Math.exp(ACK_SIGMA * z));
}

/**
 * The team's answers to the episodes of the history, in time order. Episodes raised within
 * DEMO_FRESH_MINUTES of `nowMs` get none (they wait for the visitor); faults with a site visit to
 * wait for are shelved by the technician (at most MAX_SHELVE_HOURS); everything else is acknowledged
 * by the operator by day and the technician at night, about one in three with a comment.
 */
export function planTeamResponses(episodes: readonly DemoEpisode[], nowMs: number): TeamAction[] {
  const [technician, operator] = DEMO_ON_CALL;
  const actions: TeamAction[] = [];
  for (const e of episodes) {
    if (nowMs - e.activatedAtMs < DEMO_FRESH_MINUTES * MINUTE_MS) continue;
    const seed = seedFromText(e.alarmKey);
    const atMs = e.activatedAtMs + Math.round(ackDelayMinutes(e) * MINUTE_MS);
    if (atMs >= nowMs) continue;
    const actor = isNight(atMs, e.timeZone) ? technician : operator;
    const shelveReason = SHELVED_KINDS[e.kind];
    if (shelveReason) {
      const until = Math.min(atMs + MAX_SHELVE_HOURS * HOUR_MS, atMs + (8 + Math.floor(uniformAt(seed, e.activatedAtMs, 2) * 16)) * HOUR_MS);
      actions.push({ alarmKey: e.alarmKey, atMs, actor: technician, input: { type: "shelve", at: atMs, until }, comment: null, reason: shelveReason });
      continue;
    }
    const pool = COMMENTS[e.kind] ?? [];
    const says = pool.length > 0 && uniformAt(seed, e.activatedAtMs, 3) < 0.35 ? pool[Math.floor(uniformAt(seed, e.activatedAtMs, 4) * pool.length)] : null;
    actions.push({ alarmKey: e.alarmKey, atMs, actor, input: { type: "acknowledge" }, comment: says, reason: null });
  }
  return actions.sort((a, b) => a.atMs - b.atMs);
}

export interface ReplayedEvent extends EngineEvent {
  actor: string;
  comment: string | null;
}

/**
 * One alarm's history through the engine: its condition changes and the team's actions in time order
 * (an action the state no longer allows, such as acknowledging an alarm already shelved, is skipped,
 * as the API would refuse it).
 */
export function replayWithTeam(record: AlarmRecord, changes: readonly ConditionChange[], actions: readonly TeamAction[]): { record: AlarmRecord; events: ReplayedEvent[] } {
  type Step = { atMs: number; order: number; apply: (r: AlarmRecord) => { record: AlarmRecord; events: ReplayedEvent[] } | null };
  const steps: Step[] = [
    ...changes.map((c, i): Step => ({
      atMs: new Date(c.at).getTime(),
      order: i,
      apply: (r) => {
        const out = applyAlarmInput(r, { type: c.active ? "condition_active" : "condition_cleared" }, c);
        return out.ok ? { record: out.result.record, events: out.result.events.map((e) => ({ ...e, actor: "worker", comment: null })) } : null;
      },
    })),
    ...actions.map((a, i): Step => ({
      atMs: a.atMs,
      order: changes.length + i,
      apply: (r) => {
        const cause = a.input.type === "shelve" ? `shelved until ${new Date(a.input.until).toISOString()}: ${a.reason ?? ""}` : a.input.type.replaceAll("_", " ");
        const out = applyAlarmInput(r, a.input, { at: a.atMs, cause });
        return out.ok ? { record: out.result.record, events: out.result.events.map((e) => ({ ...e, actor: a.actor, comment: a.comment })) } : null;
      },
    })),
  ].sort((x, y) => x.atMs - y.atMs || x.order - y.order);
  let current = record;
  const events: ReplayedEvent[] = [];
  for (const s of steps) {
    const out = s.apply(current);
    if (!out) continue;
    current = out.record;
    events.push(...out.events);
  }
  return { record: current, events };
}

export interface SeededLevelAlarm {
  key: SetpointKey;
  record: AlarmRecord;
  events: ReplayedEvent[];
  /** The evaluator's memory at the seed's time: the worker carries on from there, later readings only. */
  evalState: SetpointState;
  /** The acknowledgement that stands (of the current episode), if any. */
  acknowledged: { atMs: number; actor: string } | null;
}

const HISTORY_DAYS = 30;
const STEP_MS = 5 * MINUTE_MS;

/**
 * A demo tank's level alarms over the 30 days before `nowMs`, with the team's answers: its level on
 * the backfill's 5-minute grid from the simulator's own usage (the first run taken as `nowMs`), each
 * stored setpoint judged by the engine, and the replay of its condition changes with the team.
 */
export function demoTankHistory(tank: DemoTank, setpoints: readonly SetpointDef[], timeZone: string, nowMs: number): SeededLevelAlarm[] {
  const samples: { at: number; value: number }[] = [];
  for (let t = nowMs - HISTORY_DAYS * 24 * HOUR_MS; t <= nowMs; t += STEP_MS) {
    samples.push({ at: t, value: levelForFillPct(tank.geometry, scenarioFillPct(tank.usage, t, timeZone, nowMs)) });
  }
  return setpoints.map((sp) => {
    const judged = evaluateLevelAlarm(sp, newAlarmRecord(sp.priority), null, samples);
    const changes: ConditionChange[] = judged.events.map((e) => ({ at: e.at, active: e.kind === "activated" || e.kind === "re_alarmed", value: e.value, setpoint: e.setpoint, cause: e.cause }));
    const episodes: DemoEpisode[] = judged.events
      .filter((e) => e.kind === "activated" || e.kind === "re_alarmed")
      .map((e, i) => ({ alarmKey: `${tank.key}:${sp.key}:${i}`, kind: sp.key, priority: sp.priority, timeZone, activatedAtMs: Date.parse(e.at), clearedAtMs: null }));
    const actions = planTeamResponses(episodes, nowMs);
    const replay = replayWithTeam(newAlarmRecord(sp.priority), changes, actions);
    const lastAck = [...replay.events].reverse().find((e) => e.kind === "acknowledged" && e.episode === replay.record.episode);
    return {
      key: sp.key,
      record: replay.record,
      events: replay.events,
      evalState: judged.state,
      acknowledged: lastAck ? { atMs: Date.parse(lastAck.at), actor: lastAck.actor } : null,
    };
  });
}
