// Floods and grouping for the alarm screens: whether the operator position is in an alarm flood now
// (REFERENCES.md §4: more than 10 alarms in 10 min, ending below ~5 per 10 min), and alarm lists
// grouped by cause, device or site with counts. Pure: the caller loads the alarms and activations.
//
// The operator position is the organisation: Halftrip's operators watch every site of their
// organisation from one desk (PRODUCT.md, roles), so three sites at five alarms each in ten minutes
// flood that desk although no single site would. A site page may still ask about its own alarms
// (pass only those), and a larger organisation split into desks passes each desk's sites.
// Count what the operator was shown: activations and re-alarms, not conditions logged while shelved,
// suppressed or out of service; a common cause or a device alarm counts once, its members not at all.

import { sweepTenMinuteWindows, FLOOD_END_BELOW_PER_10_MIN, FLOOD_START_ABOVE_PER_10_MIN } from "./alarm-health";
import { type AlarmPriority, type AlarmState, type Instant, ALARM_PRIORITIES, instantToMs, isHiddenState } from "./state-machine";
import { needsAcknowledgement } from "./engine";

const TEN_MIN_MS = 10 * 60_000;

export interface FloodStatus {
  active: boolean;
  /** When the flood began (the activation that took the count above 10), null when none is on. */
  since: string | null;
  /** Activations in the trailing 10 min, (now − 10 min, now]. */
  lastTenMinutes: number;
  /** Most activations in 10 min during the flood on, or 0. */
  peakPer10Min: number;
  /** What the screens say, e.g. "Alarm flood since 14:02 UTC: 14 alarms in the last 10 min". */
  summary: string;
}

/**
 * Whether the position is in a flood at `now`, from its activation times (any order; those after
 * `now` are ignored). The same sweep as the alarm-health report, so the banner and the report agree:
 * a flood starts when the trailing count exceeds FLOOD_START_ABOVE_PER_10_MIN and lasts until it
 * falls below FLOOD_END_BELOW_PER_10_MIN. Pass at least the activations since the last quiet spell
 * (a few hours is plenty).
 */
export function detectFlood(activations: readonly Instant[], now: Instant): FloodStatus {
  const nowMs = instantToMs(now);
  const times = activations.map(instantToMs).filter((t) => t <= nowMs);
  const lastTenMinutes = times.filter((t) => t > nowMs - TEN_MIN_MS).length;
  const { floods } = sweepTenMinuteWindows(times, nowMs + 1);
  const current = floods.find((f) => f.ongoing);
  if (!current) {
    return { active: false, since: null, lastTenMinutes, peakPer10Min: 0, summary: `No alarm flood: ${lastTenMinutes} in the last 10 min` };
  }
  return {
    active: true,
    since: current.start,
    lastTenMinutes,
    peakPer10Min: current.peakPer10Min,
    summary: `Alarm flood since ${current.start}: ${lastTenMinutes} alarms in the last 10 min (a flood is more than ${FLOOD_START_ABOVE_PER_10_MIN} in 10 min; it ends below ${FLOOD_END_BELOW_PER_10_MIN})`,
  };
}

export interface GroupableAlarm {
  id: string;
  siteId: string;
  /** The device behind it: a channel alarm's device, a tank's measuring device, a device alarm's own; null if none. */
  deviceId: string | null;
  state: AlarmState;
  priority: AlarmPriority;
  conditionActive: boolean;
  /** The cause it is suppressed by or a member of (consequential.ts causeKey / CommonCause.key), if any. */
  causeKey?: string | null;
}

export type AlarmGrouping = "cause" | "device" | "site";

export interface AlarmGroupCounts {
  total: number;
  /** Unacknowledged or returned-unacknowledged: waiting for someone. */
  needsAttention: number;
  /** Condition active now, in any state. */
  active: number;
  /** Shelved, suppressed by design or out of service (shown on request). */
  hidden: number;
  byPriority: Record<AlarmPriority, number>;
}

export interface AlarmGroup {
  /** "cause:<key>", "device:<id>", "site:<id>". */
  key: string;
  by: AlarmGrouping;
  id: string;
  siteId: string;
  alarmIds: string[];
  counts: AlarmGroupCounts;
  /** The highest priority among the alarms that need attention or are active, else among all. */
  highestPriority: AlarmPriority;
}

function groupKey(a: GroupableAlarm, by: AlarmGrouping): { by: AlarmGrouping; id: string } {
  if (by === "cause" && a.causeKey) return { by: "cause", id: a.causeKey };
  if (by !== "site" && a.deviceId) return { by: "device", id: a.deviceId };
  return { by: "site", id: a.siteId };
}

const rank = (p: AlarmPriority) => ALARM_PRIORITIES.indexOf(p);

/**
 * Groups an alarm list: by cause (an alarm with a cause key joins its cause; the others fall back to
 * their device, then their site), by device (falling back to the site) or by site. Groups come
 * most urgent first: more needing attention, then higher priority, then more alarms.
 */
export function groupAlarms(alarms: readonly GroupableAlarm[], by: AlarmGrouping): AlarmGroup[] {
  const groups = new Map<string, AlarmGroup>();
  const urgentPriorities = new Map<string, AlarmPriority[]>();
  for (const a of alarms) {
    const g = groupKey(a, by);
    const key = `${g.by}:${g.id}`;
    let group = groups.get(key);
    if (!group) {
      const byPriority = Object.fromEntries(ALARM_PRIORITIES.map((p) => [p, 0])) as Record<AlarmPriority, number>;
      group = { key, by: g.by, id: g.id, siteId: a.siteId, alarmIds: [], counts: { total: 0, needsAttention: 0, active: 0, hidden: 0, byPriority }, highestPriority: "low" };
      groups.set(key, group);
    }
    group.alarmIds.push(a.id);
    group.counts.total++;
    group.counts.byPriority[a.priority]++;
    if (needsAcknowledgement(a.state)) group.counts.needsAttention++;
    if (a.conditionActive) group.counts.active++;
    if (isHiddenState(a.state)) group.counts.hidden++;
    if (needsAcknowledgement(a.state) || (a.conditionActive && !isHiddenState(a.state))) urgentPriorities.set(key, [...(urgentPriorities.get(key) ?? []), a.priority]);
  }
  for (const g of groups.values()) {
    const urgent = urgentPriorities.get(g.key);
    const candidates = urgent ?? ALARM_PRIORITIES.filter((p) => g.counts.byPriority[p] > 0);
    g.highestPriority = [...candidates].sort((x, y) => rank(x) - rank(y))[0];
  }
  return [...groups.values()].sort(
    (a, b) =>
      b.counts.needsAttention - a.counts.needsAttention ||
      rank(a.highestPriority) - rank(b.highestPriority) ||
      b.counts.total - a.counts.total ||
      a.key.localeCompare(b.key),
  );
}
