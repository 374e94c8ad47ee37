import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  initialAlarmSnapshot,
  isHiddenState,
  snapshotProblem,
  transitionAlarm,
  type AlarmInput,
  type AlarmSnapshot,
  type AlarmState,
} from "@/lib/alarms/state-machine";

// Model-based test of the alarm state machine (fast-check commands): random sequences of process
// events and operator actions run against the reducer and against a model written from the ISA-18.2 /
// IEC 62682 transitions of REFERENCES.md §4 [published] plus the choices the module's header documents
// (latching, which hidden state may follow which). After every step the reducer must agree with the
// model and leave a valid state.

// A fixed start, so nothing depends on the wall clock.
const T0 = Date.UTC(2026, 2, 14, 6, 30);

interface Model {
  /** The process condition as the field reports it. */
  condition: boolean;
  latching: boolean;
  state: AlarmState;
  /** The condition was active at some point since the alarm was last normal. */
  activatedSinceNormal: boolean;
  now: number;
  shelvedUntil: number | null;
}

interface Real {
  snapshot: AlarmSnapshot;
}

const IN_SERVICE: readonly AlarmState[] = ["normal", "unacknowledged", "acknowledged", "returned_unacknowledged"];
const ms = (at: Date | number | string) => new Date(at).getTime();
const landing = (m: Model): AlarmState => (m.condition ? "unacknowledged" : "normal");

type Outcome = "refused" | AlarmState;

/** What REFERENCES.md §4 (and the module's documented choices) say the input leads to. */
function expectedOutcome(m: Model, input: AlarmInput): Outcome {
  const s = m.state;
  switch (input.type) {
    case "condition_active":
      // Normal→Unack on occurrence; RTN-Unack→Unack on re-alarm; a latched (cleared, acknowledged) alarm that comes back is a new occurrence.
      if (s === "normal" || s === "returned_unacknowledged") return "unacknowledged";
      if (s === "acknowledged" && !m.condition) return "unacknowledged";
      return s;
    case "condition_cleared":
      if (s === "unacknowledged") return "returned_unacknowledged";
      if (s === "acknowledged") return m.latching ? "acknowledged" : "normal";
      return s;
    case "acknowledge":
      if (s === "unacknowledged") return "acknowledged";
      if (s === "returned_unacknowledged") return m.latching ? "acknowledged" : "normal";
      return "refused";
    case "reset":
      return m.latching && s === "acknowledged" && !m.condition ? "normal" : "refused";
    case "shelve":
      if (s === "suppressed_by_design" || s === "out_of_service") return "refused";
      return ms(input.until) > ms(input.at) ? "shelved" : "refused";
    case "unshelve":
      return s === "shelved" ? landing(m) : "refused";
    case "shelve_expired":
      return s === "shelved" && m.shelvedUntil !== null && ms(input.at) >= m.shelvedUntil ? landing(m) : "refused";
    case "suppress":
      return IN_SERVICE.includes(s) ? "suppressed_by_design" : "refused";
    case "unsuppress":
      return s === "suppressed_by_design" ? landing(m) : "refused";
    case "remove_from_service":
      return s === "out_of_service" ? "refused" : "out_of_service";
    case "return_to_service":
      return s === "out_of_service" ? landing(m) : "refused";
    case "close_as_history":
      // A non-latching occurrence that activated and cleared before anyone could see it is kept as history.
      return s === "returned_unacknowledged" && !m.latching ? "normal" : "refused";
  }
}

function apply(m: Model, r: Real, input: AlarmInput) {
  const before = r.snapshot;
  const expected = expectedOutcome(m, input);
  const result = transitionAlarm(before, input);
  const processEvent = input.type === "condition_active" || input.type === "condition_cleared";

  expect(result.ok, `${input.type} from ${before.state}`).toBe(expected !== "refused");
  if (!result.ok) return;
  const next = result.next;

  // Model update.
  if (processEvent) m.condition = input.type === "condition_active";
  if (m.condition) m.activatedSinceNormal = true;
  m.state = expected as AlarmState;
  if (m.state === "normal") m.activatedSinceNormal = m.condition;
  if (input.type === "shelve") m.shelvedUntil = ms(input.until);
  if (m.state !== "shelved") m.shelvedUntil = null;

  // The reducer agrees with the model and leaves a valid snapshot.
  expect(snapshotProblem(next)).toBeNull();
  expect(next.state).toBe(m.state);
  // The condition is evaluated and recorded in every state, hidden ones included (§4).
  expect(next.conditionActive).toBe(m.condition);
  expect(next.latching).toBe(m.latching);
  expect(next.shelvedUntil === null ? null : Date.parse(next.shelvedUntil)).toBe(m.shelvedUntil);

  // Acknowledged, unacknowledged and returned-unacknowledged exist only after an activation.
  if (next.state !== "normal" && IN_SERVICE.includes(next.state)) expect(m.activatedSinceNormal).toBe(true);
  // Annunciation means newly unacknowledged, and nothing hidden annunciates on a process event.
  expect(result.annunciated).toBe(next.state === "unacknowledged" && before.state !== "unacknowledged");
  if (processEvent && isHiddenState(before.state)) {
    expect(result.annunciated).toBe(false);
    expect(next.state).toBe(before.state);
  }
  // Out of service: process events change nothing but the recorded condition.
  if (processEvent && before.state === "out_of_service") expect(next).toEqual({ ...before, conditionActive: m.condition });
  // An audit event exactly when something changed.
  expect(result.changed).toBe(JSON.stringify(next) !== JSON.stringify(before));
  expect(result.eventKind === null).toBe(!result.changed);
  r.snapshot = next;
}

class Step implements fc.Command<Model, Real> {
  constructor(readonly input: (m: Model) => AlarmInput, readonly label: string) {}
  check = () => true;
  run(m: Model, r: Real) {
    apply(m, r, this.input(m));
  }
  toString = () => this.label;
}

class AdvanceClock implements fc.Command<Model, Real> {
  constructor(readonly ms: number) {}
  check = () => true;
  run(m: Model) {
    m.now += this.ms;
  }
  toString = () => `advance ${this.ms} ms`;
}

const simple = (type: AlarmInput["type"]) => fc.constant(new Step(() => ({ type }) as AlarmInput, type));
const commands = [
  simple("condition_active"),
  simple("condition_cleared"),
  simple("acknowledge"),
  simple("reset"),
  simple("unshelve"),
  simple("suppress"),
  simple("unsuppress"),
  simple("remove_from_service"),
  simple("return_to_service"),
  simple("close_as_history"),
  // Shelving for −1 min … 8 h from the model's now (a zero or negative span must be refused).
  fc.integer({ min: -60_000, max: 8 * 3_600_000 }).map((span) => new Step((m) => ({ type: "shelve", at: new Date(m.now), until: new Date(m.now + span) }), `shelve for ${span} ms`)),
  fc.constant(new Step((m) => ({ type: "shelve_expired", at: new Date(m.now).toISOString() }), "shelve_expired now")),
  fc.integer({ min: 1, max: 4 * 3_600_000 }).map((ms) => new AdvanceClock(ms)),
];

describe("alarm state machine against the ISA-18.2 model (REFERENCES.md §4)", () => {
  it.each([false, true])("latching %s: every sequence of events leaves the state the model expects, and a valid one", (latching) => {
    fc.assert(
      fc.property(fc.commands(commands, { maxCommands: 60 }), (cmds) => {
        const model: Model = { condition: false, latching, state: "normal", activatedSinceNormal: false, now: T0, shelvedUntil: null };
        fc.modelRun(() => ({ model, real: { snapshot: initialAlarmSnapshot(latching) } }), cmds);
      }),
      { numRuns: 500 },
    );
  });

  it("a process event never throws and always succeeds, from any reachable state", () => {
    fc.assert(
      fc.property(fc.commands(commands, { maxCommands: 40 }), fc.boolean(), fc.boolean(), (cmds, latching, active) => {
        const model: Model = { condition: false, latching, state: "normal", activatedSinceNormal: false, now: T0, shelvedUntil: null };
        const real: Real = { snapshot: initialAlarmSnapshot(latching) };
        fc.modelRun(() => ({ model, real }), cmds);
        expect(transitionAlarm(real.snapshot, { type: active ? "condition_active" : "condition_cleared" }).ok).toBe(true);
      }),
      { numRuns: 300 },
    );
  });
});
