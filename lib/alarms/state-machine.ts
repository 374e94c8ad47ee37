// Alarm states and transitions after ISA-18.2 / IEC 62682: a pure reducer from (snapshot, input)
// to the next snapshot, with the audit event the change stands for.
//
// Transitions (REFERENCES.md §4):
//   normal ──condition_active──▶ unacknowledged ──acknowledge──▶ acknowledged ──condition_cleared──▶ normal
//   unacknowledged ──condition_cleared──▶ returned_unacknowledged ──acknowledge──▶ normal
//   returned_unacknowledged ──condition_active──▶ unacknowledged (re-alarm)
//   shelved, suppressed_by_design, out_of_service: entered by an action (suppression by the rules of
//   ./consequential, which the worker applies and logs like any other input), the condition is still evaluated and
//   recorded in `conditionActive`; on leaving, the alarm lands in unacknowledged when the condition
//   is active and in normal when it is clear.
//
// Latching (an option per alarm): a latching alarm does not return to normal by itself.
//   - acknowledged, condition clears → stays acknowledged with conditionActive = false (latched);
//   - returned_unacknowledged, acknowledge → acknowledged with conditionActive = false (latched);
//   - reset is accepted only in that latched state (acknowledged and clear) and leads to normal;
//     an unacknowledged or still-active alarm cannot be reset, so a reset never hides an alarm the
//     operator has not seen;
//   - a latched alarm whose condition comes back is a new occurrence → unacknowledged.
//   The latch is not kept through shelving, suppression or out-of-service: on leaving those the
//   alarm lands by its condition only.
//
// Which hidden state may follow which (the three are exclusive):
//   shelved    — from normal, unacknowledged, acknowledged, returned_unacknowledged; shelving a
//                shelved alarm replaces its expiry;
//   suppressed_by_design — by equipment-state logic (./consequential: a silent device, a faulty
//                sensor), from the same four states; it does not annunciate and is not notified,
//                and screens show it on request;
//   out_of_service — from any state but itself; it overrides shelving and suppression.
// History (./late-history): returned_unacknowledged ──close_as_history──▶ normal, for an occurrence
// that activated and cleared in readings the worker saw only afterwards; non-latching alarms only.
// Repeating an action (acknowledging twice, returning an in-service alarm) is an error; condition
// inputs are idempotent (the same condition twice changes nothing).

export const ALARM_STATES = [
  "normal",
  "unacknowledged",
  "acknowledged",
  "returned_unacknowledged",
  "shelved",
  "suppressed_by_design",
  "out_of_service",
] as const;
export type AlarmState = (typeof ALARM_STATES)[number];

export const ALARM_PRIORITIES = ["critical", "high", "medium", "low"] as const;
export type AlarmPriority = (typeof ALARM_PRIORITIES)[number];

/** A point in time: a Date, epoch milliseconds or an ISO 8601 string. */
export type Instant = Date | number | string;

/** Epoch milliseconds of an instant; throws a RangeError for an unreadable one. */
export function instantToMs(at: Instant): number {
  const ms = at instanceof Date ? at.getTime() : typeof at === "number" ? at : Date.parse(at);
  if (!Number.isFinite(ms)) throw new RangeError(`not a valid instant: ${String(at)}`);
  return ms;
}

export interface AlarmSnapshot {
  state: AlarmState;
  /** The condition as last evaluated, kept up to date in every state. */
  conditionActive: boolean;
  /** A latching alarm needs a reset after it clears (see the header). */
  latching: boolean;
  /** ISO 8601 expiry while shelved, otherwise null. */
  shelvedUntil: string | null;
}

export type AlarmInput =
  | { type: "condition_active" }
  | { type: "condition_cleared" }
  | { type: "acknowledge" }
  | { type: "shelve"; at: Instant; until: Instant }
  | { type: "unshelve" }
  | { type: "shelve_expired"; at: Instant }
  | { type: "suppress" }
  | { type: "unsuppress" }
  | { type: "remove_from_service" }
  | { type: "return_to_service" }
  | { type: "reset" }
  /** An occurrence that activated and cleared before anyone could be shown it (late readings): kept as history. */
  | { type: "close_as_history" };

export type AlarmEventKind =
  | "activated"
  | "re_alarmed"
  | "returned_to_normal"
  | "cleared_while_latched"
  | "acknowledged"
  | "reset"
  | "shelved"
  | "unshelved"
  | "shelve_expired"
  | "suppressed"
  | "unsuppressed"
  | "removed_from_service"
  | "returned_to_service"
  /** returned_unacknowledged → normal for an occurrence nobody was shown (./late-history). */
  | "recorded_as_history"
  /** The condition became active while shelved, suppressed or out of service: recorded, not annunciated. */
  | "condition_active_logged"
  /** The condition cleared while shelved, suppressed or out of service. */
  | "condition_cleared_logged";

export type AlarmActionErrorCode =
  | "not_acknowledgeable"
  | "not_resettable"
  | "not_shelvable"
  | "not_shelved"
  | "shelve_not_expired"
  | "invalid_shelve_expiry"
  | "not_suppressible"
  | "not_suppressed"
  | "already_out_of_service"
  | "not_out_of_service"
  | "not_history";

export interface AlarmTransition {
  ok: true;
  next: AlarmSnapshot;
  /** True when anything in the snapshot changed; then eventKind names the audit event. */
  changed: boolean;
  eventKind: AlarmEventKind | null;
  /** The alarm newly entered unacknowledged: the on-call list is to be notified. */
  annunciated: boolean;
}

export interface AlarmActionError {
  ok: false;
  code: AlarmActionErrorCode;
  message: string;
}

export type AlarmTransitionResult = AlarmTransition | AlarmActionError;

/** A new alarm: normal, condition clear. */
export function initialAlarmSnapshot(latching = false): AlarmSnapshot {
  return { state: "normal", conditionActive: false, latching, shelvedUntil: null };
}

/** True for a latching alarm that has cleared and been acknowledged and now waits for a reset. */
export function isAwaitingReset(s: AlarmSnapshot): boolean {
  return s.latching && s.state === "acknowledged" && !s.conditionActive;
}

/** True when a shelved alarm's expiry has passed at `now` (the worker then sends shelve_expired). */
export function isShelveDue(s: AlarmSnapshot, now: Instant): boolean {
  return s.state === "shelved" && s.shelvedUntil !== null && instantToMs(now) >= instantToMs(s.shelvedUntil);
}

const HIDDEN_STATES: readonly AlarmState[] = ["shelved", "suppressed_by_design", "out_of_service"];
const ANNUNCIATED_STATES: readonly AlarmState[] = ["normal", "unacknowledged", "acknowledged", "returned_unacknowledged"];

function move(current: AlarmSnapshot, patch: Partial<AlarmSnapshot>, eventKind: AlarmEventKind): AlarmTransition {
  const next: AlarmSnapshot = { ...current, ...patch };
  return {
    ok: true,
    next,
    changed: true,
    eventKind,
    annunciated: next.state === "unacknowledged" && current.state !== "unacknowledged",
  };
}

function unchanged(current: AlarmSnapshot): AlarmTransition {
  return { ok: true, next: current, changed: false, eventKind: null, annunciated: false };
}

function refuse(code: AlarmActionErrorCode, message: string): AlarmActionError {
  return { ok: false, code, message };
}

/** Where an alarm lands when it leaves shelving, suppression or out-of-service. */
function landingState(conditionActive: boolean): AlarmState {
  return conditionActive ? "unacknowledged" : "normal";
}

function leaveHidden(current: AlarmSnapshot, eventKind: AlarmEventKind): AlarmTransition {
  return move(current, { state: landingState(current.conditionActive), shelvedUntil: null }, eventKind);
}

function onConditionActive(s: AlarmSnapshot): AlarmTransition {
  switch (s.state) {
    case "normal":
      return move(s, { state: "unacknowledged", conditionActive: true }, "activated");
    case "returned_unacknowledged":
      return move(s, { state: "unacknowledged", conditionActive: true }, "re_alarmed");
    case "acknowledged":
      // Only a latched (cleared) alarm is acknowledged with its condition clear.
      return s.conditionActive ? unchanged(s) : move(s, { state: "unacknowledged", conditionActive: true }, "re_alarmed");
    case "unacknowledged":
      return unchanged(s);
    default:
      return s.conditionActive ? unchanged(s) : move(s, { conditionActive: true }, "condition_active_logged");
  }
}

function onConditionCleared(s: AlarmSnapshot): AlarmTransition {
  switch (s.state) {
    case "normal":
    case "returned_unacknowledged":
      return unchanged(s);
    case "unacknowledged":
      return move(s, { state: "returned_unacknowledged", conditionActive: false }, "returned_to_normal");
    case "acknowledged":
      if (!s.conditionActive) return unchanged(s);
      return s.latching
        ? move(s, { conditionActive: false }, "cleared_while_latched")
        : move(s, { state: "normal", conditionActive: false }, "returned_to_normal");
    default:
      return s.conditionActive ? move(s, { conditionActive: false }, "condition_cleared_logged") : unchanged(s);
  }
}

function onAcknowledge(s: AlarmSnapshot): AlarmTransitionResult {
  switch (s.state) {
    case "unacknowledged":
      return move(s, { state: "acknowledged" }, "acknowledged");
    case "returned_unacknowledged":
      return move(s, { state: s.latching ? "acknowledged" : "normal" }, "acknowledged");
    case "acknowledged":
      return refuse("not_acknowledgeable", "This alarm is already acknowledged.");
    case "normal":
      return refuse("not_acknowledgeable", "This alarm is normal; there is nothing to acknowledge.");
    default:
      return refuse("not_acknowledgeable", `This alarm is ${s.state.replaceAll("_", " ")}; it can be acknowledged once it is unshelved, unsuppressed or back in service.`);
  }
}

function onReset(s: AlarmSnapshot): AlarmTransitionResult {
  if (!s.latching) return refuse("not_resettable", "This alarm does not latch; it returns to normal by itself.");
  if (isAwaitingReset(s)) return move(s, { state: "normal" }, "reset");
  if (s.state === "returned_unacknowledged") return refuse("not_resettable", "Acknowledge this alarm before resetting it.");
  if (s.conditionActive && (s.state === "acknowledged" || s.state === "unacknowledged")) {
    return refuse("not_resettable", "The alarm condition is still active; it can be reset once it clears.");
  }
  return refuse("not_resettable", "This alarm is not latched; there is nothing to reset.");
}

function onShelve(s: AlarmSnapshot, at: Instant, until: Instant): AlarmTransitionResult {
  if (s.state === "suppressed_by_design" || s.state === "out_of_service") {
    return refuse("not_shelvable", `This alarm is ${s.state.replaceAll("_", " ")}; it cannot be shelved.`);
  }
  const untilMs = instantToMs(until);
  if (untilMs <= instantToMs(at)) return refuse("invalid_shelve_expiry", "The shelve expiry must be in the future.");
  const shelvedUntil = new Date(untilMs).toISOString();
  if (s.state === "shelved" && s.shelvedUntil === shelvedUntil) return unchanged(s);
  return move(s, { state: "shelved", shelvedUntil }, "shelved");
}

function onShelveExpired(s: AlarmSnapshot, at: Instant): AlarmTransitionResult {
  if (s.state !== "shelved") return refuse("not_shelved", "This alarm is not shelved.");
  if (!isShelveDue(s, at)) return refuse("shelve_not_expired", `The shelve runs until ${s.shelvedUntil}.`);
  return leaveHidden(s, "shelve_expired");
}

/**
 * Applies one input to an alarm. Condition inputs always succeed; an action that the current state
 * does not allow answers `{ ok: false, code, message }` (lib/services/alarms.ts turns it into an application error).
 */
export function transitionAlarm(current: AlarmSnapshot, input: AlarmInput): AlarmTransitionResult {
  const problem = snapshotProblem(current);
  if (problem) throw new RangeError(`inconsistent alarm snapshot: ${problem}`);
  switch (input.type) {
    case "condition_active":
      return onConditionActive(current);
    case "condition_cleared":
      return onConditionCleared(current);
    case "acknowledge":
      return onAcknowledge(current);
    case "reset":
      return onReset(current);
    case "close_as_history":
      // A latching alarm keeps asking for its reset: its whole point is that a passing excursion is seen.
      return current.state === "returned_unacknowledged" && !current.latching
        ? move(current, { state: "normal" }, "recorded_as_history")
        : refuse("not_history", "Only a non-latching alarm that returned to normal unacknowledged can be kept as history.");
    case "shelve":
      return onShelve(current, input.at, input.until);
    case "unshelve":
      return current.state === "shelved" ? leaveHidden(current, "unshelved") : refuse("not_shelved", "This alarm is not shelved.");
    case "shelve_expired":
      return onShelveExpired(current, input.at);
    case "suppress":
      return ANNUNCIATED_STATES.includes(current.state)
        ? move(current, { state: "suppressed_by_design" }, "suppressed")
        : refuse("not_suppressible", `This alarm is ${current.state.replaceAll("_", " ")}; it cannot be suppressed.`);
    case "unsuppress":
      return current.state === "suppressed_by_design"
        ? leaveHidden(current, "unsuppressed")
        : refuse("not_suppressed", "This alarm is not suppressed.");
    case "remove_from_service":
      return current.state === "out_of_service"
        ? refuse("already_out_of_service", "This alarm is already out of service.")
        : move(current, { state: "out_of_service", shelvedUntil: null }, "removed_from_service");
    case "return_to_service":
      return current.state === "out_of_service"
        ? leaveHidden(current, "returned_to_service")
        : refuse("not_out_of_service", "This alarm is in service.");
  }
}

/** True in the states where the alarm is not shown to the operator (the condition is still evaluated). */
export function isHiddenState(state: AlarmState): boolean {
  return HIDDEN_STATES.includes(state);
}

/**
 * What makes a snapshot impossible, or null when it is consistent: unacknowledged means active;
 * normal and returned_unacknowledged mean clear; acknowledged and clear exists only for a latching
 * alarm; shelvedUntil is set exactly while shelved. The reducer refuses (throws on) such a snapshot
 * rather than guess which field is wrong.
 */
export function snapshotProblem(s: AlarmSnapshot): string | null {
  if (!ALARM_STATES.includes(s.state)) return `unknown state ${String(s.state)}`;
  if (s.state === "unacknowledged" && !s.conditionActive) return "unacknowledged with the condition clear";
  if ((s.state === "normal" || s.state === "returned_unacknowledged") && s.conditionActive) {
    return `${s.state} with the condition active`;
  }
  if (s.state === "acknowledged" && !s.conditionActive && !s.latching) return "acknowledged and clear but not latching";
  if ((s.state === "shelved") !== (s.shelvedUntil !== null)) return "shelvedUntil must be set exactly while shelved";
  if (s.shelvedUntil !== null && !Number.isFinite(Date.parse(s.shelvedUntil))) return "shelvedUntil is not a valid instant";
  return null;
}
