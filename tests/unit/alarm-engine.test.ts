import { describe, it, expect } from "vitest";
import { linearRegression } from "simple-statistics";
import {
  ALARM_CAUTION,
  RATE_ALARM_SETTINGS,
  applyAlarmInput,
  applyConditionChanges,
  evaluateLevelAlarm,
  evaluateRateAlarm,
  healthFlagChanges,
  newAlarmRecord,
  shelveExpiry,
  type AlarmRecord,
} from "@/lib/alarms/engine";
import type { LevelSample, SetpointDef, SetpointState } from "@/lib/alarms/setpoints";

const T0 = Date.parse("2026-03-14T06:00:00Z");
const at = (s: number) => T0 + s * 1000;
const samples = (pairs: [number, number][]): LevelSample[] => pairs.map(([s, value]) => ({ at: at(s), value }));

// The test tank of tests/support/fleet.ts: 2.8 m tall; deadband 5 % of span = 0.14 m and on-delay 60 s
// are the level values of REFERENCES.md §4 (deadband: published, sources differ; on-delay: from memory).
const H: SetpointDef = { key: "h", value: 2.5, deadband: 0.14, onDelayS: 60, priority: "medium", enabled: true };
const L: SetpointDef = { key: "l", value: 0.6, deadband: 0.14, onDelayS: 60, priority: "low", enabled: true };

function run(def: SetpointDef, pairs: [number, number][], record = newAlarmRecord(def.priority), state: SetpointState | null = null) {
  return evaluateLevelAlarm(def, record, state, samples(pairs));
}

function ack(record: AlarmRecord, s: number): AlarmRecord {
  const r = applyAlarmInput(record, { type: "acknowledge" }, { at: at(s), cause: "acknowledged" });
  if (!r.ok) throw new Error(r.message);
  return r.result.record;
}

describe("level alarm through the engine — on-delay", () => {
  it("activates only after the level holds at or above H for the on-delay, with the activation's value and setpoint", () => {
    const r = run(H, [
      [0, 2.4],
      [10, 2.55],
      [40, 2.6],
      [69, 2.6],
      [70, 2.62],
    ]);
    expect(r.record.snapshot.state).toBe("unacknowledged");
    expect(r.events).toHaveLength(1);
    expect(r.events[0]).toMatchObject({ kind: "activated", fromState: "normal", toState: "unacknowledged", value: 2.62, setpoint: 2.5, episode: 1 });
    // Activation at the first sample 60 s after the run began (10 s → 70 s).
    expect(r.events[0].at).toBe(new Date(at(70)).toISOString());
    expect(r.events[0].cause).toMatch(/2\.620 m ≥ H 2\.500 m for 60 s/);
    expect(r.record.activatedAt).toBe(new Date(at(70)).toISOString());
  });

  it("restarts the on-delay when one sample dips back below H, so a brief excursion never alarms", () => {
    const r = run(H, [
      [0, 2.6],
      [50, 2.49],
      [60, 2.6],
      [110, 2.6],
    ]);
    expect(r.record.snapshot.state).toBe("normal");
    expect(r.events).toEqual([]);
    expect(r.state.pendingSinceMs).toBe(at(60));
  });

  it("resumes the on-delay from the stored state across batches", () => {
    const first = run(H, [[0, 2.6], [30, 2.6]]);
    expect(first.record.snapshot.state).toBe("normal");
    const second = run(H, [[60, 2.6]], first.record, first.state);
    expect(second.record.snapshot.state).toBe("unacknowledged");
  });
});

describe("level alarm through the engine — deadband", () => {
  it("stays active inside the deadband and returns to normal only below H − deadband (2.36 m)", () => {
    const active = run({ ...H, onDelayS: 0 }, [[0, 2.6]]);
    const acked = ack(active.record, 5);
    const r = run({ ...H, onDelayS: 0 }, [[10, 2.45], [20, 2.37], [30, 2.36], [40, 2.35]], acked, active.state);
    // 2.36 is exactly H − deadband: a high alarm clears strictly below it (setpoints.ts).
    expect(r.events.map((e) => [e.kind, e.value])).toEqual([["returned_to_normal", 2.35]]);
    expect(r.record.snapshot.state).toBe("normal");
    expect(r.record.clearedAt).toBe(new Date(at(40)).toISOString());
    expect(r.events[0].cause).toMatch(/2\.350 m < H 2\.500 m − deadband 0\.140 m = 2\.360 m/);
  });

  it("clears a low alarm only above L + deadband, and an unacknowledged one waits as returned_unacknowledged", () => {
    const active = run({ ...L, onDelayS: 0 }, [[0, 0.5]]);
    expect(active.record.snapshot.state).toBe("unacknowledged");
    const r = run({ ...L, onDelayS: 0 }, [[10, 0.7], [20, 0.75]], active.record, active.state);
    expect(r.events.map((e) => e.kind)).toEqual(["returned_to_normal"]);
    expect(r.events[0].value).toBe(0.75);
    expect(r.record.snapshot.state).toBe("returned_unacknowledged");
  });

  it("is idempotent: the same batch evaluated twice adds no events", () => {
    const pairs: [number, number][] = [[0, 2.6], [60, 2.6], [120, 2.3]];
    const once = run(H, pairs);
    const twice = evaluateLevelAlarm(H, once.record, once.state, samples(pairs));
    expect(once.events.map((e) => e.kind)).toEqual(["activated", "returned_to_normal"]);
    expect(twice.events).toEqual([]);
    expect(twice.samplesUsed).toBe(0);
    expect(twice.record).toEqual(once.record);
  });

  it("clears an active alarm when its setpoint is disabled", () => {
    const active = run({ ...H, onDelayS: 0 }, [[0, 2.6]]);
    const r = run({ ...H, enabled: false }, [[10, 2.7]], active.record, active.state);
    expect(r.events.map((e) => e.kind)).toEqual(["returned_to_normal"]);
    expect(r.events[0].cause).toMatch(/disabled/);
  });
});

describe("episodes (what a notification belongs to)", () => {
  it("keeps one episode through a re-alarm before anyone acknowledged, and starts another after an acknowledgement", () => {
    const def = { ...H, onDelayS: 0 };
    let r = run(def, [[0, 2.6], [10, 2.3], [20, 2.6]]);
    expect(r.events.map((e) => e.kind)).toEqual(["activated", "returned_to_normal", "re_alarmed"]);
    expect(r.record.episode).toBe(1);
    expect(r.record.activations).toBe(2);
    const acked = ack(r.record, 25);
    r = run(def, [[30, 2.3], [40, 2.6]], acked, r.state);
    expect(r.events.map((e) => e.kind)).toEqual(["returned_to_normal", "activated"]);
    expect(r.record.episode).toBe(2);
    expect(r.record.activations).toBe(3);
  });
});

describe("rate-of-change alarm through the engine", () => {
  // One sample a minute over 90 min.
  const ramp = (slopeMPerH: number, start = 2, minutes = 90): LevelSample[] =>
    Array.from({ length: minutes + 1 }, (_, i) => ({ at: at(i * 60), value: start + (slopeMPerH * i) / 60 }));

  it("activates on a fall faster than the limit once the window spans the minimum (30 min), with the slope as value", () => {
    const falling = ramp(-0.5);
    const r = evaluateRateAlarm({ limitMPerH: 0.3, enabled: true }, newAlarmRecord("high"), null, [], falling);
    expect(r.events).toHaveLength(1);
    expect(r.events[0].kind).toBe("activated");
    // First evaluation with a 30-min span: the sample at 30 min (minSpanS 1800 s).
    expect(r.events[0].at).toBe(new Date(at(30 * 60)).toISOString());
    // The slope of a noiseless ramp equals the least-squares slope (simple-statistics linearRegression).
    const window = falling.slice(0, 31).map((s) => [Number(s.at) / 3_600_000, s.value]);
    expect(r.events[0].value).toBeCloseTo(linearRegression(window).m, 9);
    expect(r.events[0].setpoint).toBe(-0.3);
  });

  it("never activates on a rise (a refill) or on a fall slower than the limit", () => {
    expect(evaluateRateAlarm({ limitMPerH: 0.3, enabled: true }, newAlarmRecord("high"), null, [], ramp(0.8)).events).toEqual([]);
    expect(evaluateRateAlarm({ limitMPerH: 0.3, enabled: true }, newAlarmRecord("high"), null, [], ramp(-0.25)).events).toEqual([]);
  });

  it("clears only once the fall is slower than 80 % of the limit, and uses stored history across batches", () => {
    const falling = ramp(-0.5, 2, 60);
    const first = evaluateRateAlarm({ limitMPerH: 0.3, enabled: true }, newAlarmRecord("high"), null, [], falling);
    expect(first.record.snapshot.state).toBe("unacknowledged");
    // The tank then falls at 0.26 m/h (above 0.8 × 0.3 = 0.24 m/h): still active…
    const slower = Array.from({ length: 61 }, (_, i) => ({ at: at((61 + i) * 60), value: falling[60].value - (0.26 * (i + 1)) / 60 }));
    const second = evaluateRateAlarm({ limitMPerH: 0.3, enabled: true }, first.record, first.state, falling, slower);
    expect(second.events).toEqual([]);
    // …and levels off: the trailing slope climbs above −0.24 m/h and the condition clears.
    const flat = Array.from({ length: 61 }, (_, i) => ({ at: at((122 + i) * 60), value: slower[60].value }));
    const third = evaluateRateAlarm({ limitMPerH: 0.3, enabled: true }, second.record, second.state, [...falling, ...slower], flat);
    expect(third.events.map((e) => e.kind)).toEqual(["returned_to_normal"]);
    expect(third.events[0].value as number).toBeGreaterThanOrEqual(-0.3 * RATE_ALARM_SETTINGS.clearShare);
  });

  it("evaluates at most once a minute", () => {
    const dense = Array.from({ length: 121 }, (_, i) => ({ at: at(i * 10), value: 2 - i * 0.001 }));
    const r = evaluateRateAlarm({ limitMPerH: 0.3, enabled: true }, newAlarmRecord("high"), null, [], dense);
    expect(r.state.lastEvalAtMs).toBe(at(1200));
  });
});

describe("health-flag alarms", () => {
  it("turns flag intervals into activations and clears in time order, skipping what was already evaluated", () => {
    const intervals = [
      { since: at(600), clearedAt: null, magnitude: null },
      { since: at(0), clearedAt: at(300), magnitude: 0.02 },
    ];
    const all = healthFlagChanges("stuck", intervals, null);
    expect(all.map((c) => [c.active, Number(c.at)])).toEqual([[true, at(0)], [false, at(300)], [true, at(600)]]);
    const later = healthFlagChanges("stuck", intervals, at(300));
    expect(later.map((c) => c.active)).toEqual([true]);
    const r = applyConditionChanges(newAlarmRecord("low"), all);
    expect(r.events.map((e) => e.kind)).toEqual(["activated", "returned_to_normal", "re_alarmed"]);
    expect(r.events[0].cause).toBe("sensor stuck flag raised by the worker");
  });

  it("clears an active alarm whose flag was withdrawn at the instant it opened", () => {
    const opened = applyConditionChanges(newAlarmRecord("medium"), healthFlagChanges("offline", [{ since: at(5), clearedAt: null, magnitude: null }], null));
    expect(opened.record.snapshot.conditionActive).toBe(true);
    const withdrawn = [{ since: at(5), clearedAt: at(5), magnitude: null }];
    expect(healthFlagChanges("offline", withdrawn, at(5), false)).toEqual([]);
    const changes = healthFlagChanges("offline", withdrawn, at(5), true);
    expect(changes.map((c) => c.active)).toEqual([false]);
    const r = applyConditionChanges(opened.record, changes);
    expect(r.record.snapshot.state).toBe("returned_unacknowledged");
  });

  it("keeps an interval that opens and clears at one instant in that order", () => {
    const changes = healthFlagChanges("offline", [{ since: at(5), clearedAt: at(5), magnitude: null }], null);
    expect(changes.map((c) => c.active)).toEqual([true, false]);
  });
});

describe("shelving", () => {
  it("returns a shelved alarm by itself once its expiry passes, landing by its condition", () => {
    const active = run({ ...H, onDelayS: 0 }, [[0, 2.6]]).record;
    const shelved = applyAlarmInput(active, { type: "shelve", at: at(10), until: at(3610) }, { at: at(10), cause: "shelved" });
    if (!shelved.ok) throw new Error(shelved.message);
    expect(shelveExpiry(shelved.result.record, at(3000))).toBeNull();
    const back = shelveExpiry(shelved.result.record, at(3700));
    expect(back?.events.map((e) => [e.kind, e.toState])).toEqual([["shelve_expired", "unacknowledged"]]);
    expect(back?.events[0].at).toBe(new Date(at(3610)).toISOString());
  });

  it("refuses to acknowledge a normal alarm, with the reducer's message", () => {
    const r = applyAlarmInput(newAlarmRecord("low"), { type: "acknowledge" }, { at: at(0), cause: "acknowledged" });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toMatch(/normal/);
  });
});

describe("the caution", () => {
  it("names the standards PRODUCT.md asks for", () => {
    expect(ALARM_CAUTION).toMatch(/not an overfill-prevention or safety system/);
    expect(ALARM_CAUTION).toMatch(/API 2350/);
    expect(ALARM_CAUTION).toMatch(/IEC 61511/);
  });
});
