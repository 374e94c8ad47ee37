import { describe, it, expect } from "vitest";
import {
  ALARM_STATES,
  type AlarmInput,
  type AlarmSnapshot,
  type AlarmState,
  type AlarmTransition,
  initialAlarmSnapshot,
  isAwaitingReset,
  isHiddenState,
  isShelveDue,
  snapshotProblem,
  transitionAlarm,
} from "@/lib/alarms/state-machine";

const T0 = "2026-03-14T06:00:00.000Z";
const IN_2H = "2026-03-14T08:00:00.000Z";

function ok(s: AlarmSnapshot, input: AlarmInput): AlarmTransition {
  const r = transitionAlarm(s, input);
  if (!r.ok) throw new Error(`expected ${input.type} to succeed from ${s.state}: ${r.message}`);
  return r;
}

function run(s: AlarmSnapshot, ...inputs: AlarmInput[]): AlarmSnapshot {
  return inputs.reduce((acc, input) => ok(acc, input).next, s);
}

const ACTIVE: AlarmInput = { type: "condition_active" };
const CLEAR: AlarmInput = { type: "condition_cleared" };
const ACK: AlarmInput = { type: "acknowledge" };
const SHELVE: AlarmInput = { type: "shelve", at: T0, until: IN_2H };

// One snapshot per state the operator can see, for a non-latching alarm.
const normal = initialAlarmSnapshot();
const unack = run(normal, ACTIVE);
const acked = run(unack, ACK);
const rtnUnack = run(unack, CLEAR);
const annunciated: [string, AlarmSnapshot][] = [
  ["normal", normal],
  ["unacknowledged", unack],
  ["acknowledged", acked],
  ["returned_unacknowledged", rtnUnack],
];

describe("ISA-18.2 / IEC 62682 transitions (REFERENCES.md §4, published)", () => {
  // Each row is a transition REFERENCES.md §4 lists: from, input, to.
  const table: [AlarmSnapshot, AlarmInput, AlarmState, string][] = [
    [normal, ACTIVE, "unacknowledged", "Normal→Unack when the condition occurs"],
    [unack, ACK, "acknowledged", "Unack→Ack on acknowledge"],
    [unack, CLEAR, "returned_unacknowledged", "Unack→RTN-Unack when it clears"],
    [acked, CLEAR, "normal", "Ack→Normal when it clears"],
    [rtnUnack, ACK, "normal", "RTN-Unack→Normal on acknowledge"],
    [rtnUnack, ACTIVE, "unacknowledged", "RTN-Unack→Unack on re-alarm"],
  ];
  for (const [from, input, to, label] of table) {
    it(label, () => {
      const r = ok(from, input);
      expect(r.next.state).toBe(to);
      expect(r.changed).toBe(true);
      expect(r.next.conditionActive).toBe(to === "unacknowledged" || to === "acknowledged");
    });
  }

  it("names the audit event of each transition and flags the ones that need a notification", () => {
    expect(ok(normal, ACTIVE)).toMatchObject({ eventKind: "activated", annunciated: true });
    expect(ok(unack, ACK)).toMatchObject({ eventKind: "acknowledged", annunciated: false });
    expect(ok(unack, CLEAR)).toMatchObject({ eventKind: "returned_to_normal", annunciated: false });
    expect(ok(acked, CLEAR)).toMatchObject({ eventKind: "returned_to_normal", annunciated: false });
    expect(ok(rtnUnack, ACK)).toMatchObject({ eventKind: "acknowledged", annunciated: false });
    expect(ok(rtnUnack, ACTIVE)).toMatchObject({ eventKind: "re_alarmed", annunciated: true });
  });

  it("treats a repeated condition as no change, without an event", () => {
    for (const [s, input] of [
      [normal, CLEAR],
      [unack, ACTIVE],
      [acked, ACTIVE],
      [rtnUnack, CLEAR],
    ] as const) {
      const r = ok(s, input);
      expect(r.changed).toBe(false);
      expect(r.eventKind).toBeNull();
      expect(r.next).toEqual(s);
    }
  });

  it("does not mutate the snapshot it is given", () => {
    const before = structuredClone(unack);
    transitionAlarm(unack, ACK);
    expect(unack).toEqual(before);
  });

  it("uses exactly the state names of the API (PRODUCT.md)", () => {
    expect([...ALARM_STATES].sort()).toEqual(
      ["normal", "unacknowledged", "acknowledged", "returned_unacknowledged", "shelved", "out_of_service", "suppressed_by_design"].sort(),
    );
  });
});

describe("invalid actions answer a typed error (API: 409)", () => {
  it("refuses to acknowledge a normal, an acknowledged or a hidden alarm", () => {
    const shelved = run(unack, SHELVE);
    const oos = run(unack, { type: "remove_from_service" });
    for (const s of [normal, acked, shelved, oos]) {
      const r = transitionAlarm(s, ACK);
      expect(r).toMatchObject({ ok: false, code: "not_acknowledgeable" });
      if (!r.ok) expect(r.message.length).toBeGreaterThan(0);
    }
  });

  it("refuses reset of a non-latching alarm in every state", () => {
    for (const [, s] of annunciated) {
      expect(transitionAlarm(s, { type: "reset" })).toMatchObject({ ok: false, code: "not_resettable" });
    }
  });

  it("refuses unshelve, return to service, unsuppress when not in that state", () => {
    expect(transitionAlarm(unack, { type: "unshelve" })).toMatchObject({ ok: false, code: "not_shelved" });
    expect(transitionAlarm(unack, { type: "shelve_expired", at: IN_2H })).toMatchObject({ ok: false, code: "not_shelved" });
    expect(transitionAlarm(unack, { type: "return_to_service" })).toMatchObject({ ok: false, code: "not_out_of_service" });
    expect(transitionAlarm(unack, { type: "unsuppress" })).toMatchObject({ ok: false, code: "not_suppressed" });
    const oos = run(normal, { type: "remove_from_service" });
    expect(transitionAlarm(oos, { type: "remove_from_service" })).toMatchObject({ ok: false, code: "already_out_of_service" });
  });

  it("refuses a shelve expiry that is not in the future", () => {
    expect(transitionAlarm(unack, { type: "shelve", at: IN_2H, until: T0 })).toMatchObject({
      ok: false,
      code: "invalid_shelve_expiry",
    });
    expect(transitionAlarm(unack, { type: "shelve", at: T0, until: T0 })).toMatchObject({ ok: false, code: "invalid_shelve_expiry" });
  });

  it("throws on an impossible snapshot instead of guessing", () => {
    const bad: AlarmSnapshot = { state: "unacknowledged", conditionActive: false, latching: false, shelvedUntil: null };
    expect(snapshotProblem(bad)).toMatch(/unacknowledged/);
    expect(() => transitionAlarm(bad, ACK)).toThrow(RangeError);
    expect(snapshotProblem({ ...acked, conditionActive: false })).toMatch(/latching/);
    expect(snapshotProblem({ ...normal, shelvedUntil: IN_2H })).toMatch(/shelvedUntil/);
    for (const [, s] of annunciated) expect(snapshotProblem(s)).toBeNull();
  });
});

describe("latching alarms need a reset (REFERENCES.md §4: latching alarms need a reset)", () => {
  const lNormal = initialAlarmSnapshot(true);
  const lUnack = run(lNormal, ACTIVE);
  const lAcked = run(lUnack, ACK);

  it("acknowledged, condition clears → stays acknowledged, latched, until reset → normal", () => {
    const cleared = ok(lAcked, CLEAR);
    expect(cleared.next).toMatchObject({ state: "acknowledged", conditionActive: false });
    expect(cleared.eventKind).toBe("cleared_while_latched");
    expect(isAwaitingReset(cleared.next)).toBe(true);
    const reset = ok(cleared.next, { type: "reset" });
    expect(reset.next.state).toBe("normal");
    expect(reset.eventKind).toBe("reset");
  });

  it("unacknowledged, condition clears → returned_unacknowledged; acknowledge → latched acknowledged, not normal", () => {
    const rtn = run(lUnack, CLEAR);
    expect(rtn.state).toBe("returned_unacknowledged");
    expect(transitionAlarm(rtn, { type: "reset" })).toMatchObject({ ok: false, code: "not_resettable" });
    const acknowledged = run(rtn, ACK);
    expect(acknowledged).toMatchObject({ state: "acknowledged", conditionActive: false });
    expect(run(acknowledged, { type: "reset" }).state).toBe("normal");
  });

  it("refuses reset while the condition is still active", () => {
    for (const s of [lUnack, lAcked]) {
      const r = transitionAlarm(s, { type: "reset" });
      expect(r).toMatchObject({ ok: false, code: "not_resettable" });
      if (!r.ok) expect(r.message).toMatch(/still active/);
    }
    expect(transitionAlarm(lNormal, { type: "reset" })).toMatchObject({ ok: false, code: "not_resettable" });
  });

  it("a latched alarm whose condition returns is a new occurrence → unacknowledged", () => {
    const latched = run(lAcked, CLEAR);
    const r = ok(latched, ACTIVE);
    expect(r.next.state).toBe("unacknowledged");
    expect(r).toMatchObject({ eventKind: "re_alarmed", annunciated: true });
  });

  it("behaves like a non-latching alarm until it clears", () => {
    expect(lUnack.state).toBe("unacknowledged");
    expect(lAcked.state).toBe("acknowledged");
    expect(run(lUnack, CLEAR, ACTIVE).state).toBe("unacknowledged");
  });
});

describe("shelving with an expiry (REFERENCES.md §4: from any state, condition still evaluated and logged)", () => {
  for (const [name, s] of annunciated) {
    it(`shelves from ${name}`, () => {
      const r = ok(s, SHELVE);
      expect(r.next).toMatchObject({ state: "shelved", shelvedUntil: IN_2H, conditionActive: s.conditionActive });
      expect(r).toMatchObject({ eventKind: "shelved", annunciated: false });
    });
  }

  it("keeps evaluating the condition underneath, logging each change without annunciating", () => {
    const shelved = run(normal, SHELVE);
    const on = ok(shelved, ACTIVE);
    expect(on.next).toMatchObject({ state: "shelved", conditionActive: true });
    expect(on).toMatchObject({ eventKind: "condition_active_logged", annunciated: false, changed: true });
    const off = ok(on.next, CLEAR);
    expect(off.next).toMatchObject({ state: "shelved", conditionActive: false });
    expect(off.eventKind).toBe("condition_cleared_logged");
    expect(ok(off.next, CLEAR).changed).toBe(false);
  });

  it("unshelve lands in unacknowledged when the condition is active, normal when clear", () => {
    const activeUnder = run(normal, SHELVE, ACTIVE);
    const r = ok(activeUnder, { type: "unshelve" });
    expect(r.next).toMatchObject({ state: "unacknowledged", shelvedUntil: null });
    expect(r).toMatchObject({ eventKind: "unshelved", annunciated: true });
    // Shelved while active and unacknowledged, cleared underneath: comes back normal.
    expect(run(unack, SHELVE, CLEAR, { type: "unshelve" }).state).toBe("normal");
    // Shelved while acknowledged: the acknowledgement does not survive, an active condition is announced again.
    expect(run(acked, SHELVE, { type: "unshelve" }).state).toBe("unacknowledged");
  });

  it("expires only at or after its expiry", () => {
    const shelved = run(unack, SHELVE);
    expect(isShelveDue(shelved, "2026-03-14T07:59:59.999Z")).toBe(false);
    expect(transitionAlarm(shelved, { type: "shelve_expired", at: "2026-03-14T07:59:59.999Z" })).toMatchObject({
      ok: false,
      code: "shelve_not_expired",
    });
    expect(isShelveDue(shelved, IN_2H)).toBe(true);
    const r = ok(shelved, { type: "shelve_expired", at: IN_2H });
    expect(r.next).toMatchObject({ state: "unacknowledged", shelvedUntil: null });
    expect(r.eventKind).toBe("shelve_expired");
    expect(run(normal, SHELVE, { type: "shelve_expired", at: Date.parse(IN_2H) + 1 }).state).toBe("normal");
  });

  it("re-shelving replaces the expiry; the same expiry changes nothing", () => {
    const shelved = run(unack, SHELVE);
    const later = ok(shelved, { type: "shelve", at: T0, until: new Date("2026-03-14T10:00:00Z") });
    expect(later.next.shelvedUntil).toBe("2026-03-14T10:00:00.000Z");
    expect(ok(shelved, SHELVE).changed).toBe(false);
  });

  it("a latched alarm loses its latch through shelving and lands by its condition", () => {
    const latched = run(initialAlarmSnapshot(true), ACTIVE, ACK, CLEAR);
    expect(run(latched, SHELVE, { type: "unshelve" }).state).toBe("normal");
  });

  it("cannot shelve a suppressed or out-of-service alarm", () => {
    expect(transitionAlarm(run(unack, { type: "suppress" }), SHELVE)).toMatchObject({ ok: false, code: "not_shelvable" });
    expect(transitionAlarm(run(unack, { type: "remove_from_service" }), SHELVE)).toMatchObject({ ok: false, code: "not_shelvable" });
  });
});

describe("suppressed by design (REFERENCES.md §4)", () => {
  for (const [name, s] of annunciated) {
    it(`suppresses from ${name} and returns by the condition`, () => {
      const suppressed = ok(s, { type: "suppress" });
      expect(suppressed.next.state).toBe("suppressed_by_design");
      expect(suppressed.eventKind).toBe("suppressed");
      const back = ok(suppressed.next, { type: "unsuppress" });
      expect(back.next.state).toBe(s.conditionActive ? "unacknowledged" : "normal");
      expect(back.eventKind).toBe("unsuppressed");
    });
  }

  it("evaluates the condition while suppressed and refuses to suppress a shelved alarm", () => {
    expect(run(normal, { type: "suppress" }, ACTIVE, { type: "unsuppress" }).state).toBe("unacknowledged");
    expect(transitionAlarm(run(normal, SHELVE), { type: "suppress" })).toMatchObject({ ok: false, code: "not_suppressible" });
    expect(transitionAlarm(run(normal, { type: "suppress" }), { type: "suppress" })).toMatchObject({
      ok: false,
      code: "not_suppressible",
    });
  });
});

describe("out of service (REFERENCES.md §4: from any state, condition still evaluated and logged)", () => {
  const fromStates: [string, AlarmSnapshot][] = [
    ...annunciated,
    ["shelved", run(unack, SHELVE)],
    ["suppressed", run(unack, { type: "suppress" })],
    ["latched acknowledged", run(initialAlarmSnapshot(true), ACTIVE, ACK, CLEAR)],
  ];
  for (const [name, s] of fromStates) {
    it(`removes from service from ${name}`, () => {
      const r = ok(s, { type: "remove_from_service" });
      expect(r.next).toMatchObject({ state: "out_of_service", shelvedUntil: null, conditionActive: s.conditionActive });
      expect(r.eventKind).toBe("removed_from_service");
    });
  }

  it("follows the condition underneath and returns to the state it implies", () => {
    const oos = run(normal, { type: "remove_from_service" });
    const on = ok(oos, ACTIVE);
    expect(on.next).toMatchObject({ state: "out_of_service", conditionActive: true });
    expect(on).toMatchObject({ eventKind: "condition_active_logged", annunciated: false });
    const back = ok(on.next, { type: "return_to_service" });
    expect(back.next.state).toBe("unacknowledged");
    expect(back).toMatchObject({ eventKind: "returned_to_service", annunciated: true });

    const clearedUnder = run(unack, { type: "remove_from_service" }, CLEAR, ACTIVE, CLEAR);
    expect(clearedUnder).toMatchObject({ state: "out_of_service", conditionActive: false });
    expect(run(clearedUnder, { type: "return_to_service" }).state).toBe("normal");
  });

  it("counts shelved, suppressed and out of service as hidden states", () => {
    expect(ALARM_STATES.filter(isHiddenState).sort()).toEqual(["out_of_service", "shelved", "suppressed_by_design"]);
  });
});
