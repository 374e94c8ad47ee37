// Maintenance windows: shelve, or take out of service, every alarm of a device or a site at once, with
// a reason and an expiry. Pure: which alarms a window covers, the inputs to apply when it starts and
// when it ends, and whether a window is acceptable. ISA-18.2 (REFERENCES.md §4) asks that shelving be
// time-limited and that shelving and out-of-service keep evaluating and logging the condition; the
// state machine does the latter.
//
// Shelve vs out of service: shelving is for a short job while the alarms are a nuisance (at most
// MAX_SHELVE_HOURS, and each alarm returns by its own expiry even if nobody remembers); out of service
// is for equipment that is off or being worked on for longer, up to MAX_OUT_OF_SERVICE_DAYS, and is
// ended by the window's own expiry (maintenanceEndInputs), never left open.

import { MAX_SHELVE_HOURS } from "./engine";
import { type AlarmInput, type AlarmState, type Instant, instantToMs } from "./state-machine";

/** Longest an out-of-service window may run (Halftrip's choice: a month-long job is planned again, not forgotten). */
export const MAX_OUT_OF_SERVICE_DAYS = 31;
/** A reason a colleague can act on; a word or two is not one (Halftrip's choice). */
export const MIN_REASON_LENGTH = 8;

export interface MaintenanceWindow {
  scope: "device" | "site";
  /** The device's or the site's id. */
  scopeId: string;
  mode: "shelve" | "out_of_service";
  from: Instant;
  until: Instant;
  reason: string;
}

export interface MaintainableAlarm {
  id: string;
  siteId: string;
  /** The devices it depends on: a channel alarm's device; every device measuring a tank for its level alarms. */
  deviceIds: readonly string[];
  state: AlarmState;
}

export type MaintenanceProblem = "reason_missing" | "until_not_after_from" | "shelve_too_long" | "out_of_service_too_long";

const HOUR_MS = 3_600_000;

/** What is wrong with a window, each problem once; empty when it may be applied. */
export function maintenanceProblems(w: MaintenanceWindow): MaintenanceProblem[] {
  const out: MaintenanceProblem[] = [];
  if (w.reason.trim().length < MIN_REASON_LENGTH) out.push("reason_missing");
  const span = instantToMs(w.until) - instantToMs(w.from);
  if (!(span > 0)) out.push("until_not_after_from");
  if (w.mode === "shelve" && span > MAX_SHELVE_HOURS * HOUR_MS) out.push("shelve_too_long");
  if (w.mode === "out_of_service" && span > MAX_OUT_OF_SERVICE_DAYS * 24 * HOUR_MS) out.push("out_of_service_too_long");
  return out;
}

/** Whether the window covers an alarm: a site window every alarm of the site, a device window every alarm depending on the device. */
export function coversAlarm(w: MaintenanceWindow, a: MaintainableAlarm): boolean {
  return w.scope === "site" ? a.siteId === w.scopeId : a.deviceIds.includes(w.scopeId);
}

/** Whether the window is in force at an instant: from ≤ at < until. */
export function isInForce(w: MaintenanceWindow, at: Instant): boolean {
  const t = instantToMs(at);
  return t >= instantToMs(w.from) && t < instantToMs(w.until);
}

export interface MaintenanceStep {
  alarmId: string;
  input: AlarmInput;
  /** The event's cause: the window's reason and its end. */
  cause: string;
}

/**
 * The inputs that start a window on the alarms it covers (call again for an alarm created while the
 * window is in force, e.g. a device alarm raised by the very work). Alarms already out of service on
 * their own are left alone, so the window's end does not return them; a shelved alarm's shelve is
 * replaced by the window's; out of service overrides shelving and suppression.
 */
export function maintenanceStartInputs(w: MaintenanceWindow, alarms: readonly MaintainableAlarm[], at: Instant): MaintenanceStep[] {
  if (maintenanceProblems(w).length || !isInForce(w, at)) return [];
  const until = new Date(instantToMs(w.until)).toISOString();
  const cause = `maintenance of the ${w.scope} until ${until}: ${w.reason.trim()}`;
  const steps: MaintenanceStep[] = [];
  for (const a of alarms) {
    if (!coversAlarm(w, a) || a.state === "out_of_service") continue;
    if (w.mode === "out_of_service") steps.push({ alarmId: a.id, input: { type: "remove_from_service" }, cause });
    else if (a.state !== "suppressed_by_design") steps.push({ alarmId: a.id, input: { type: "shelve", at, until: w.until }, cause });
  }
  return steps;
}

/**
 * The inputs that end a window at or after its expiry: out-of-service members return to service
 * (landing by their condition, so what happened meanwhile is announced now). Shelved members need
 * nothing: their own expiry (the worker's shelve_expired) returns them at the same instant.
 * `members` are the alarm ids the window took out of service.
 */
export function maintenanceEndInputs(w: MaintenanceWindow, members: readonly string[], alarms: readonly MaintainableAlarm[], now: Instant): MaintenanceStep[] {
  if (instantToMs(now) < instantToMs(w.until) || w.mode !== "out_of_service") return [];
  const cause = `maintenance of the ${w.scope} ended: ${w.reason.trim()}`;
  return alarms
    .filter((a) => members.includes(a.id) && a.state === "out_of_service")
    .map((a) => ({ alarmId: a.id, input: { type: "return_to_service" }, cause }));
}
