import { describe, it, expect } from "vitest";
import { applyAlarmInput, applyConditionChanges, evaluateLevelAlarm, newAlarmRecord, type AlarmRecord, type EngineEvent } from "@/lib/alarms/engine";
import {
  MEASUREMENT_FAULT_FLAGS,
  followCondition,
  planConsequences,
  reconcileSuppression,
  targetKey,
  type ChannelConditions,
  type DeviceConditions,
} from "@/lib/alarms/consequential";
import { initialSetpointState, type SetpointDef } from "@/lib/alarms/setpoints";
import type { HealthFlagKind } from "@/lib/health/flags";

// The states and transitions checked here are those of REFERENCES.md §4 (ISA-18.2 / IEC 62682,
// published): suppressed by design from any state, the condition still evaluated and logged. Which
// alarms are consequences of which cause is Halftrip's rationalisation (common practice in alarm
// rationalisation: alarm the cause, suppress its consequences); the counts expected below are
// worked out by hand from the scenario of each test.

const T0 = Date.parse("2026-03-14T06:00:00Z");
const at = (min: number) => new Date(T0 + min * 60_000).toISOString();

function channel(id: string, asset: string | null, flags: [HealthFlagKind, number][] = []): ChannelConditions {
  return { channelId: id, assetId: asset, label: asset ?? id, openFlags: flags.map(([flag, min]) => ({ flag, since: at(min) })) };
}

function device(id: string, channels: ChannelConditions[], silentSinceMin: number | null = null, siteId = "site-1"): DeviceConditions {
  return { deviceId: id, siteId, label: `Device ${id}`, silentSince: silentSinceMin === null ? null : at(silentSinceMin), channels };
}

const annunciations = (events: readonly EngineEvent[]) => events.filter((e) => e.toState === "unacknowledged" && e.fromState !== "unacknowledged").length;

describe("a silent multi-channel device is ONE alarm", () => {
  const channels = ["a", "b", "c", "d"].map((x) => channel(`ch-${x}`, `tank-${x}`, [["offline", 15]]));
  const silent = device("dev-1", channels, 15);

  it("raises one device alarm and suppresses its four channel-offline alarms and its tanks' level and rate alarms", () => {
    const plan = planConsequences([silent]);
    expect(plan.deviceOffline.filter((d) => d.active)).toHaveLength(1);
    expect(plan.deviceOffline[0].since).toBe(at(15));
    for (const x of ["a", "b", "c", "d"]) {
      expect(plan.suppressions.has(targetKey({ scope: "channel", channelId: `ch-${x}`, kind: "offline" }))).toBe(true);
      for (const kind of ["hh", "h", "l", "ll", "rate_of_change"] as const) {
        expect(plan.suppressions.has(targetKey({ scope: "asset", assetId: `tank-${x}`, kind }))).toBe(true);
      }
    }
    // 4 channel-offline + 4 tanks × 5 level-derived alarms.
    expect(plan.suppressions.size).toBe(4 + 4 * 5);
  });

  it("annunciates once: the channel alarms are suppressed before their own condition arrives, which is logged, not announced", () => {
    const plan = planConsequences([silent]);
    const events: EngineEvent[] = [];
    let deviceAlarm = newAlarmRecord("medium");
    const r = followCondition(deviceAlarm, true, at(15), plan.deviceOffline[0].cause);
    deviceAlarm = r.record;
    events.push(...r.events);
    for (const c of channels) {
      const step = reconcileSuppression(newAlarmRecord("medium"), plan.suppressions.get(targetKey({ scope: "channel", channelId: c.channelId, kind: "offline" })), at(15));
      expect(step.record.snapshot.state).toBe("suppressed_by_design");
      const flagged = applyConditionChanges(step.record, [{ at: at(15), active: true, value: null, setpoint: null, cause: "offline flag raised" }]);
      expect(flagged.events.map((e) => e.kind)).toEqual(["condition_active_logged"]);
      events.push(...step.events, ...flagged.events);
    }
    expect(annunciations(events)).toBe(1);
    expect(deviceAlarm.snapshot.state).toBe("unacknowledged");
    // The suppression is entered with a logged event naming the cause (visible on request).
    expect(events.filter((e) => e.kind === "suppressed")).toHaveLength(4);
    expect(events.find((e) => e.kind === "suppressed")?.cause).toMatch(/silent/);
  });

  it("counts a device whose every channel is offline as offline, and one with a channel still reporting as not", () => {
    const allOff = device("dev-2", ["a", "b", "c", "d"].map((x, i) => channel(`ch-${x}`, null, [["offline", 10 + i]])));
    const off = planConsequences([allOff]).deviceOffline[0];
    expect(off.active).toBe(true);
    expect(off.since).toBe(at(13)); // the last channel to go
    const oneLeft = device("dev-3", [...["a", "b", "c"].map((x) => channel(`ch-${x}`, null, [["offline", 10]])), channel("ch-d", null)]);
    const plan = planConsequences([oneLeft]);
    expect(plan.deviceOffline[0].active).toBe(false);
    expect(plan.suppressions.size).toBe(0);
  });
});

describe("a faulty channel suppresses its own level and rate alarms", () => {
  // A 2.8 m tank, L at 0.6 m, deadband 5 % of span = 0.14 m and on-delay 60 s (REFERENCES.md §4:
  // deadband published, sources differ; on-delay from memory).
  const L: SetpointDef = { key: "l", value: 0.6, deadband: 0.14, onDelayS: 60, priority: "low", enabled: true };
  const levelTarget = targetKey({ scope: "asset", assetId: "tank-1", kind: "l" });
  const sample = (min: number, value: number) => ({ at: at(min), value });

  function faultyThenRecovered(freshLevel: number) {
    let record: AlarmRecord = newAlarmRecord("low");
    const events: EngineEvent[] = [];
    // A stuck flag opens at minute 10.
    const faulty = planConsequences([device("dev-1", [channel("ch-1", "tank-1", [["stuck", 10]])])]);
    const s1 = reconcileSuppression(record, faulty.suppressions.get(levelTarget), at(10));
    record = s1.record;
    events.push(...s1.events);
    // The stuck channel repeats 0.30 m: beyond L, logged while suppressed, never announced.
    const bad = evaluateLevelAlarm(L, record, null, [sample(11, 0.3), sample(12, 0.3), sample(13, 0.3)]);
    record = bad.record;
    events.push(...bad.events);
    expect(bad.events.map((e) => e.kind)).toEqual(["condition_active_logged"]);
    // The fault clears at minute 30: released, judged again from fresh values only.
    const healthy = planConsequences([device("dev-1", [channel("ch-1", "tank-1")])]);
    expect(healthy.suppressions.has(levelTarget)).toBe(false);
    const s2 = reconcileSuppression(record, healthy.suppressions.get(levelTarget), at(30));
    record = s2.record;
    events.push(...s2.events);
    expect(s2.restartEvaluation).toBe(true);
    expect(record.snapshot).toMatchObject({ state: "normal", conditionActive: false });
    const restarted = { ...initialSetpointState(), lastAtMs: Date.parse(at(30)) };
    const fresh = evaluateLevelAlarm(L, record, restarted, [sample(31, freshLevel), sample(32, freshLevel), sample(33, freshLevel)]);
    events.push(...fresh.events);
    return { record: fresh.record, events };
  }

  it("suppresses while the fault is open and is back, normal, when fresh values are inside the setpoint", () => {
    const { record, events } = faultyThenRecovered(1.4);
    expect(events.map((e) => e.kind)).toEqual(["suppressed", "condition_active_logged", "condition_cleared_logged", "unsuppressed"]);
    expect(record.snapshot.state).toBe("normal");
    expect(annunciations(events)).toBe(0);
  });

  it("activates from fresh values after recovery when the level really is below L (on-delay counted afresh)", () => {
    const { record, events } = faultyThenRecovered(0.5);
    expect(record.snapshot.state).toBe("unacknowledged");
    expect(annunciations(events)).toBe(1);
    const activation = events.find((e) => e.kind === "activated");
    // First fresh sample at minute 31; 60 s on-delay → active at minute 32, never from the stuck values.
    expect(activation?.at).toBe(at(32));
    expect(activation?.value).toBe(0.5);
  });

  it("treats stuck, no echo, out of range and drift as measurement faults; noisy and crosstalk risk do not suppress", () => {
    expect([...MEASUREMENT_FAULT_FLAGS].sort()).toEqual(["drift", "no_echo", "out_of_range", "stuck"]);
    for (const flag of ["noisy", "crosstalk_risk"] as const) {
      const plan = planConsequences([device("dev-1", [channel("ch-1", "tank-1", [[flag, 5]])])]);
      expect(plan.suppressions.has(levelTarget)).toBe(false);
    }
  });

  it("leaves a shelved alarm as the operator left it", () => {
    const shelved = applyAlarmInput(newAlarmRecord("low"), { type: "shelve", at: at(0), until: at(120) }, { at: at(0), cause: "shelved" });
    if (!shelved.ok) throw new Error(shelved.message);
    const plan = planConsequences([device("dev-1", [channel("ch-1", "tank-1", [["stuck", 10]])])]);
    const step = reconcileSuppression(shelved.result.record, plan.suppressions.get(levelTarget), at(10));
    expect(step.record.snapshot.state).toBe("shelved");
    expect(step.events).toEqual([]);
  });
});

describe("a common cause is one grouped alarm listing its members", () => {
  // The car park of the demo: six devices, four bays each; drift flagged on 19 bays within 40 minutes.
  const rows = ["A", "B", "C", "D"];
  const carPark = Array.from({ length: 6 }, (_, d) =>
    device(
      `cp-${d + 1}`,
      rows.map((r, i) => {
        const n = d * 4 + i;
        return channel(`ch-${r}${d + 1}`, `Bay ${r}${d + 1}`, n < 19 ? [["drift", 20 + n * 2]] : []);
      }),
    ),
  );

  it("groups 19 drift flags opened at once into one site alarm with its 19 members, and suppresses the members' drift alarms", () => {
    const plan = planConsequences(carPark, "Civic Centre Car Park");
    expect(plan.commonCauses).toHaveLength(1);
    const group = plan.commonCauses[0];
    expect(group).toMatchObject({ scope: "site", flag: "drift", since: at(20) });
    expect(group.members).toHaveLength(19);
    expect(group.members.map((m) => m.label)).toContain("Bay A1");
    expect(group.cause).toMatch(/^drift on 19 channels of Civic Centre Car Park at once: Bay A1, Bay B1/);
    const driftSuppressed = [...plan.suppressions.values()].filter((s) => s.target.kind === "drift");
    expect(driftSuppressed).toHaveLength(19);
    // A drifting bay is also a measurement fault: its occupancy has no level alarms, but a bay's asset
    // gets the level-derived suppressions all the same (19 assets × 5).
    expect(plan.suppressions.size).toBe(19 + 19 * 5);
  });

  it("keeps a lone flag days later out of the group, and groups two channels of one device as that device's cause", () => {
    const lone = device("cp-9", [channel("ch-Z9", "Bay Z9", [["drift", 3 * 24 * 60]])]);
    const twoOnOne = device("cp-7", [channel("ch-A7", "Bay A7", [["no_echo", 5]]), channel("ch-B7", "Bay B7", [["no_echo", 400]])]);
    const plan = planConsequences([...carPark, lone, twoOnOne]);
    const site = plan.commonCauses.find((g) => g.scope === "site");
    expect(site?.members.map((m) => m.channelId)).not.toContain("ch-Z9");
    const dev = plan.commonCauses.find((g) => g.scope === "device");
    expect(dev).toMatchObject({ scopeId: "cp-7", flag: "no_echo", since: at(5) });
    expect(dev?.members.map((m) => m.label)).toEqual(["Bay A7", "Bay B7"]);
    expect(plan.suppressions.has(targetKey({ scope: "channel", channelId: "ch-Z9", kind: "drift" }))).toBe(false);
  });

  it("does not group two flags on two devices (below the site minimum of three)", () => {
    const two = [device("x", [channel("c1", "B1", [["drift", 0]])]), device("y", [channel("c2", "B2", [["drift", 1]])])];
    expect(planConsequences(two).commonCauses).toEqual([]);
  });
});
