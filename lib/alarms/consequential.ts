// Consequential alarms (ISA-18.2 rationalisation): when one cause would raise many alarms, the cause
// is one alarm and the alarms that follow from it are suppressed by design while it lasts. Pure: the
// alarm stage passes the current conditions of a device's channels and gets back which device and
// common-cause alarms are active and which channel and level alarms are suppressed, and why.
//
// Rules (Halftrip's rationalisation, REFERENCES.md §4 for the state):
// 1. A device is offline when it is silent (no reading from any channel for its offline limit) or
//    every one of its channels carries an open `offline` flag: ONE `device_offline` alarm. While it
//    lasts, its channels' `offline` alarms and the level and rate alarms of the assets it measures
//    are suppressed: without readings there is nothing to judge a level by.
// 2. A channel with an open measurement fault (MEASUREMENT_FAULT_FLAGS) suppresses the level and rate
//    alarms of its asset: their values come from a sensor known to be wrong. The fault alarm itself
//    stays annunciated, so the operator learns that the level is not watched.
// 3. The same flag open on several channels at once is a common cause: on one device (two or more of
//    its channels: shared electronics, clock, cable) or across a site (SITE_GROUP_MIN_MEMBERS or more
//    channels on two or more devices, opened within GROUP_WINDOW_MIN of each other: shared air
//    temperature, a site-wide setting). It becomes ONE `common_cause` alarm listing its members; the
//    members' own flag alarms are suppressed while it stands.
// 4. When the cause ends the suppressed alarms are released through releaseSuppression: the
//    condition seen during suppression (from no values or bad ones) is dropped and the alarm is
//    judged again from the first fresh values.

import { type HealthFlagKind } from "../health/flags";
import { type AlarmKind, type AlarmRecord, type EngineEvent, type EngineResult, applyAlarmInput, applyConditionChanges } from "./engine";
import { SETPOINT_KEYS } from "./setpoints";
import { type Instant, instantToMs } from "./state-machine";

/**
 * Flags that say a channel's value is not a measurement of the level:
 * - stuck: the value is frozen, the level behind it may move anywhere;
 * - no_echo: there is no value (or a range-limit placeholder);
 * - out_of_range: the value lies outside what the transducer can measure, so it is not a distance;
 * - drift: the value carries a growing bias of unknown size (the reference target no longer reads
 *   where it should).
 * Not faults of the measurement: noisy (the filtered level is still usable; the stage already takes
 * noisy measurements for the rate history), crosstalk_risk (a configuration risk; the outlier filter
 * removes a neighbour's echo), offline (no value at all: rule 1 handles it).
 */
export const MEASUREMENT_FAULT_FLAGS = ["stuck", "no_echo", "out_of_range", "drift"] as const satisfies readonly HealthFlagKind[];

/** Flags that may form a common cause (offline is the device rule's job). */
export const GROUPABLE_FLAGS = ["drift", "stuck", "noisy", "no_echo", "out_of_range", "crosstalk_risk"] as const satisfies readonly HealthFlagKind[];

/** Alarms that follow from a level value: the four setpoints and the rate of change. */
export const LEVEL_DERIVED_KINDS: readonly AlarmKind[] = [...SETPOINT_KEYS, "rate_of_change"];

/** A site-wide common cause needs at least this many channels (Halftrip's choice)… */
export const SITE_GROUP_MIN_MEMBERS = 3;
/** …on at least this many devices (fewer is a device's cause, rule 3)… */
export const SITE_GROUP_MIN_DEVICES = 2;
/** …whose flags opened within this many minutes of the first (Halftrip's choice: "at once"). */
export const GROUP_WINDOW_MIN = 60;
/** A device-wide common cause: at least this many of one device's channels flagged alike. */
export const DEVICE_GROUP_MIN_MEMBERS = 2;

export function isMeasurementFault(flag: HealthFlagKind): boolean {
  return (MEASUREMENT_FAULT_FLAGS as readonly HealthFlagKind[]).includes(flag);
}

export interface OpenFlag {
  flag: HealthFlagKind;
  since: Instant;
}

export interface ChannelConditions {
  channelId: string;
  /** The asset it measures (a tank or a bay), null when unassigned. */
  assetId: string | null;
  /** A name for lists (a bay's or a tank's name). */
  label: string;
  openFlags: readonly OpenFlag[];
}

export interface DeviceConditions {
  deviceId: string;
  siteId: string;
  label: string;
  /** Since when no channel of the device has sent anything (past its offline limit), or null. */
  silentSince: Instant | null;
  channels: readonly ChannelConditions[];
}

/** Which stored alarm a suppression or a group concerns: level alarms belong to an asset, flag alarms to a channel. */
export type AlarmTarget = { scope: "asset"; assetId: string; kind: AlarmKind } | { scope: "channel"; channelId: string; kind: AlarmKind };

/** A stable key of a target, to look suppressions up by. */
export function targetKey(t: AlarmTarget): string {
  return t.scope === "asset" ? `asset:${t.assetId}:${t.kind}` : `channel:${t.channelId}:${t.kind}`;
}

export interface DeviceOfflineCondition {
  deviceId: string;
  siteId: string;
  active: boolean;
  /** When it began: the silence's start, or when the last channel went offline. */
  since: string | null;
  cause: string;
}

export interface CommonCauseMember {
  deviceId: string;
  channelId: string;
  assetId: string | null;
  label: string;
  since: string;
}

export interface CommonCause {
  /** Stable while the cause lasts: the group alarm's identity. */
  key: string;
  scope: "device" | "site";
  /** The device's or the site's id. */
  scopeId: string;
  siteId: string;
  flag: HealthFlagKind;
  since: string;
  members: CommonCauseMember[];
  cause: string;
}

export interface Suppression {
  target: AlarmTarget;
  /** Why, in words for the event log. */
  reason: string;
  /** The device_offline alarm's device, the fault's channel, or the common cause's key. */
  causeKey: string;
}

export interface ConsequencePlan {
  deviceOffline: DeviceOfflineCondition[];
  commonCauses: CommonCause[];
  /** By targetKey; the first cause found wins (device before fault before group). */
  suppressions: Map<string, Suppression>;
}

const iso = (at: Instant) => new Date(instantToMs(at)).toISOString();

function flagSince(channel: ChannelConditions, flag: HealthFlagKind): number | null {
  const times = channel.openFlags.filter((f) => f.flag === flag).map((f) => instantToMs(f.since));
  return times.length ? Math.min(...times) : null;
}

/** Rule 1: is the device offline, since when and why. */
export function deviceOfflineCondition(device: DeviceConditions): DeviceOfflineCondition {
  const base = { deviceId: device.deviceId, siteId: device.siteId };
  if (device.silentSince !== null) {
    return { ...base, active: true, since: iso(device.silentSince), cause: `${device.label} silent since ${iso(device.silentSince)}` };
  }
  const offlineSince = device.channels.map((c) => flagSince(c, "offline"));
  if (device.channels.length > 0 && offlineSince.every((t) => t !== null)) {
    const since = Math.max(...(offlineSince as number[]));
    return { ...base, active: true, since: iso(since), cause: `all ${device.channels.length} channels of ${device.label} offline` };
  }
  return { ...base, active: false, since: null, cause: `${device.label} reporting` };
}

function membersOf(device: DeviceConditions, flag: HealthFlagKind): CommonCauseMember[] {
  return device.channels
    .map((c) => ({ c, since: flagSince(c, flag) }))
    .filter((x): x is { c: ChannelConditions; since: number } => x.since !== null)
    .map(({ c, since }) => ({ deviceId: device.deviceId, channelId: c.channelId, assetId: c.assetId, label: c.label, since: iso(since) }));
}

function describeGroup(flag: HealthFlagKind, members: readonly CommonCauseMember[], where: string): string {
  const names = members.map((m) => m.label).join(", ");
  return `${flag.replaceAll("_", " ")} on ${members.length} channels of ${where} at once: ${names}`;
}

/** Rule 3: the common causes among the devices of one site (devices of other sites are kept apart). */
export function findCommonCauses(devices: readonly DeviceConditions[], siteLabel = "the site"): CommonCause[] {
  const causes: CommonCause[] = [];
  const bySite = new Map<string, DeviceConditions[]>();
  for (const d of devices) bySite.set(d.siteId, [...(bySite.get(d.siteId) ?? []), d]);
  for (const [siteId, siteDevices] of bySite) {
    for (const flag of GROUPABLE_FLAGS) {
      const all = siteDevices.flatMap((d) => membersOf(d, flag)).sort((a, b) => Date.parse(a.since) - Date.parse(b.since));
      const grouped = new Set<string>();
      // Clusters in time: each starts at the earliest ungrouped member and takes those within the window.
      let i = 0;
      while (i < all.length) {
        const startMs = Date.parse(all[i].since);
        let j = i;
        while (j < all.length && Date.parse(all[j].since) - startMs <= GROUP_WINDOW_MIN * 60_000) j++;
        const cluster = all.slice(i, j);
        const deviceCount = new Set(cluster.map((m) => m.deviceId)).size;
        if (cluster.length >= SITE_GROUP_MIN_MEMBERS && deviceCount >= SITE_GROUP_MIN_DEVICES) {
          for (const m of cluster) grouped.add(m.channelId);
          causes.push({
            key: `site:${siteId}:${flag}:${cluster[0].since}`,
            scope: "site",
            scopeId: siteId,
            siteId,
            flag,
            since: cluster[0].since,
            members: cluster,
            cause: describeGroup(flag, cluster, siteLabel),
          });
        }
        i = j;
      }
      for (const d of siteDevices) {
        const members = membersOf(d, flag).filter((m) => !grouped.has(m.channelId));
        if (members.length < DEVICE_GROUP_MIN_MEMBERS) continue;
        members.sort((a, b) => Date.parse(a.since) - Date.parse(b.since));
        causes.push({
          key: `device:${d.deviceId}:${flag}`,
          scope: "device",
          scopeId: d.deviceId,
          siteId,
          flag,
          since: members[0].since,
          members,
          cause: describeGroup(flag, members, d.label),
        });
      }
    }
  }
  return causes;
}

/**
 * Rules 1–3 over the devices of one site: the device alarms, the common causes and every alarm they
 * suppress. An alarm not in `suppressions` is not suppressed by design (a stored suppression of it is
 * to be released).
 */
export function planConsequences(devices: readonly DeviceConditions[], siteLabel?: string): ConsequencePlan {
  const suppressions = new Map<string, Suppression>();
  const add = (s: Suppression) => {
    const key = targetKey(s.target);
    if (!suppressions.has(key)) suppressions.set(key, s);
  };
  const deviceOffline = devices.map(deviceOfflineCondition);
  for (const [i, d] of devices.entries()) {
    const off = deviceOffline[i];
    if (!off.active) continue;
    for (const c of d.channels) {
      add({ target: { scope: "channel", channelId: c.channelId, kind: "offline" }, reason: `suppressed by design: ${off.cause}`, causeKey: `device:${d.deviceId}:offline` });
      if (c.assetId === null) continue;
      for (const kind of LEVEL_DERIVED_KINDS) {
        add({ target: { scope: "asset", assetId: c.assetId, kind }, reason: `suppressed by design: no readings, ${off.cause}`, causeKey: `device:${d.deviceId}:offline` });
      }
    }
  }
  for (const d of devices) {
    for (const c of d.channels) {
      const fault = c.openFlags.find((f) => isMeasurementFault(f.flag));
      if (!fault || c.assetId === null) continue;
      for (const kind of LEVEL_DERIVED_KINDS) {
        add({
          target: { scope: "asset", assetId: c.assetId, kind },
          reason: `suppressed by design: ${c.label} has an open ${fault.flag.replaceAll("_", " ")} fault; its values are not a measurement`,
          causeKey: `channel:${c.channelId}:${fault.flag}`,
        });
      }
    }
  }
  const commonCauses = findCommonCauses(devices, siteLabel);
  for (const g of commonCauses) {
    for (const m of g.members) {
      add({ target: { scope: "channel", channelId: m.channelId, kind: g.flag }, reason: `suppressed by design: member of the common cause "${g.cause}"`, causeKey: g.key });
    }
  }
  return { deviceOffline, commonCauses, suppressions };
}

export interface SuppressionStep {
  record: AlarmRecord;
  events: EngineEvent[];
  /**
   * The condition evaluator's memory is to be dropped (setpoint on-delay, rate window) and start again
   * after `at`: what it saw while suppressed came from no values or bad ones.
   */
  restartEvaluation: boolean;
}

/**
 * Brings one stored alarm in line with the plan: suppresses it when the plan names it (from any
 * annunciated state; shelved and out-of-service alarms stay as people left them), releases it when
 * the plan no longer does. Releasing drops the condition seen during suppression and lands in normal,
 * so the next fresh values decide; a real excursion then activates a new episode and is notified.
 */
export function reconcileSuppression(record: AlarmRecord, suppression: Suppression | undefined, at: Instant): SuppressionStep {
  const state = record.snapshot.state;
  if (suppression) {
    if (state === "suppressed_by_design" || state === "shelved" || state === "out_of_service") return { record, events: [], restartEvaluation: false };
    const r = applyAlarmInput(record, { type: "suppress" }, { at, cause: suppression.reason });
    return r.ok ? { record: r.result.record, events: r.result.events, restartEvaluation: false } : { record, events: [], restartEvaluation: false };
  }
  if (state !== "suppressed_by_design") return { record, events: [], restartEvaluation: false };
  const events: EngineEvent[] = [];
  let current = record;
  if (current.snapshot.conditionActive) {
    const cleared = applyAlarmInput(current, { type: "condition_cleared" }, { at, cause: "cause ended: the condition seen while suppressed is dropped and judged again from fresh values" });
    if (cleared.ok) {
      current = cleared.result.record;
      events.push(...cleared.result.events);
    }
  }
  const released = applyAlarmInput(current, { type: "unsuppress" }, { at, cause: "cause ended: no longer suppressed by design" });
  if (released.ok) {
    current = released.result.record;
    events.push(...released.result.events);
  }
  return { record: current, events, restartEvaluation: true };
}

/**
 * Moves a device_offline or common_cause alarm to its condition now (a change only when it differs
 * from the stored one): these alarms annunciate and are notified like any other.
 */
export function followCondition(record: AlarmRecord, active: boolean, at: Instant, cause: string): EngineResult {
  if (record.snapshot.conditionActive === active) return { record, events: [] };
  return applyConditionChanges(record, [{ at, active, value: null, setpoint: null, cause }]);
}
