import { describe, it, expect } from "vitest";
import { evaluateLevelAlarm, newAlarmRecord, applyConditionChanges } from "@/lib/alarms/engine";
import { firstNoticeHold, planNotifications, type NoticeAlarm, type OnCallPerson } from "@/lib/alarms/engine-notify";
import { isGapObservedLive, isLateReading, keepUnseenOccurrenceAsHistory, observedOutages } from "@/lib/alarms/late-history";
import type { SetpointDef } from "@/lib/alarms/setpoints";
import { initialAlarmSnapshot, transitionAlarm } from "@/lib/alarms/state-machine";

// L at 0.6 m on a 2.8 m tank; deadband 5 % of span (REFERENCES.md §4, published, sources differ) and
// on-delay 60 s (REFERENCES.md §4, from memory). Times and levels are invented for the cases.
const L: SetpointDef = { key: "l", value: 0.6, deadband: 0.14, onDelayS: 60, priority: "low", enabled: true };
const NOW = Date.parse("2026-06-10T12:00:00Z");
const min = (m: number) => NOW + m * 60_000;
const iso = (m: number) => new Date(min(m)).toISOString();
const tech: OnCallPerson = { userId: "u-tech", email: "technician@halftrip.test", position: 1, eligible: true };

function notices(alarm: NoticeAlarm, now = NOW) {
  return planNotifications({ alarms: [alarm], onCall: new Map([["s1", [tech]]]), escalationDelayMin: new Map([["s1", 15]]), sent: [], now });
}

describe("an occurrence that activated and cleared before the worker saw it is history", () => {
  // Backfilled readings from three hours ago: below L for ten minutes, then well above L + deadband.
  const late = [
    [-180, 0.8],
    [-175, 0.55],
    [-170, 0.5],
    [-165, 0.52],
    [-160, 0.9],
  ].map(([m, value]) => ({ at: min(m), value }));

  it("is stored with its activation and return, closed as history, lands in normal and is not notified", () => {
    const evaluated = evaluateLevelAlarm(L, newAlarmRecord("low"), null, late);
    expect(evaluated.record.snapshot.state).toBe("returned_unacknowledged");
    const kept = keepUnseenOccurrenceAsHistory(evaluated, NOW);
    expect(kept.events.map((e) => [e.kind, e.at])).toEqual([
      ["activated", iso(-170)], // 0.55 at −175 starts the on-delay; still beyond at −170 (≥ 60 s)
      ["returned_to_normal", iso(-160)], // 0.9 > 0.6 + 0.14
      ["recorded_as_history", iso(-160)],
    ]);
    expect(kept.record.snapshot.state).toBe("normal");
    expect(kept.record).toMatchObject({ episode: 1, activations: 1, clearedAt: iso(-160) });
    expect(
      notices({ alarmId: "a1", siteId: "s1", episode: 1, state: kept.record.snapshot.state, activatedAt: kept.record.activatedAt, clearedAt: kept.record.clearedAt }),
    ).toEqual([]);
  });

  it("leaves an occurrence that was already active when seen as returned-unacknowledged (ISA-18.2: it waits for an acknowledgement)", () => {
    const first = evaluateLevelAlarm(L, newAlarmRecord("low"), null, late.slice(0, 3));
    expect(first.record.snapshot.state).toBe("unacknowledged");
    const second = evaluateLevelAlarm(L, first.record, first.state, late.slice(3));
    const kept = keepUnseenOccurrenceAsHistory(second, NOW);
    expect(kept.record.snapshot.state).toBe("returned_unacknowledged");
    expect(kept.events.map((e) => e.kind)).toEqual(["returned_to_normal"]);
  });

  it("keeps a latching alarm asking for its reset, and the state machine refuses the close elsewhere", () => {
    const latching = evaluateLevelAlarm(L, newAlarmRecord("low", true), null, late);
    expect(keepUnseenOccurrenceAsHistory(latching, NOW).record.snapshot.state).toBe("returned_unacknowledged");
    expect(transitionAlarm(initialAlarmSnapshot(), { type: "close_as_history" })).toMatchObject({ ok: false, code: "not_history" });
  });
});

describe("first notices wait for a current state", () => {
  const active: NoticeAlarm = { alarmId: "a1", siteId: "s1", episode: 1, state: "unacknowledged", activatedAt: min(-170), clearedAt: null };

  it("holds the first notice while the alarm was judged only on late readings (LATE_AFTER_S = 900 s)", () => {
    expect(isLateReading(min(-16), NOW)).toBe(true);
    expect(isLateReading(min(-14), NOW)).toBe(false);
    expect(firstNoticeHold({ ...active, evaluatedUntil: min(-165) }, NOW)).toBe("not_current");
    expect(notices({ ...active, evaluatedUntil: min(-165) })).toEqual([]);
  });

  it("announces it once the readings have caught up and it is still active", () => {
    expect(notices({ ...active, evaluatedUntil: min(-1) }).map((n) => n.reason)).toEqual(["activation"]);
  });

  it("does not e-mail an occurrence that cleared before its first notice as needing attention", () => {
    const cleared: NoticeAlarm = { ...active, state: "returned_unacknowledged", clearedAt: min(-2), evaluatedUntil: min(-1) };
    expect(firstNoticeHold(cleared, NOW)).toBe("cleared_before_notice");
    expect(notices(cleared)).toEqual([]);
  });
});

describe("offline only for outages observed live (PRODUCT.md: offline = no reading for 3 expected intervals)", () => {
  const intervalS = 300;

  it("a backfill that delivers 30 days of history in ten minutes, with a 3.5 h gap in its measurements, observed no outage", () => {
    // Readings arrive every 2 s during the catch-up; their measurement times span 30 days.
    const arrivals = Array.from({ length: 300 }, (_, i) => NOW - 600_000 + i * 2000);
    const outages = observedOutages(arrivals, intervalS, NOW);
    expect(outages).toEqual([]);
    expect(isGapObservedLive(min(-20 * 24 * 60), min(-20 * 24 * 60 + 210), outages, NOW)).toBe(false);
  });

  it("a unit silent for 40 minutes live is offline from its last arrival + 15 min until it reports again", () => {
    const before = Array.from({ length: 6 }, (_, i) => min(-90 + i * 5)); // −90 … −65
    const after = Array.from({ length: 5 }, (_, i) => min(-25 + i * 5)); // −25 … −5
    const outages = observedOutages([...after, ...before], intervalS, NOW);
    expect(outages).toEqual([{ from: iso(-50), until: iso(-25) }]);
    // Its buffered readings (store-and-forward) later fill the measurement gap; the outage stays real.
    expect(isGapObservedLive(min(-65), min(-25), outages, NOW)).toBe(true);
  });

  it("an outage still going has no end, and an alarm follows it like any flag", () => {
    const outages = observedOutages([min(-40), min(-35)], intervalS, NOW);
    expect(outages).toEqual([{ from: iso(-20), until: null }]);
    const r = applyConditionChanges(newAlarmRecord("medium"), [{ at: outages[0].from, active: true, value: null, setpoint: null, cause: "offline observed live" }]);
    expect(r.record.snapshot.state).toBe("unacknowledged");
  });
});
