// What a tank is for decides what its plan says (PRODUCT.md, "Things in the system"):
//   supply   — drawn down and reordered: days to the reorder level and to empty, a delivery volume;
//   process  — a buffer in a process: no reorder, its alarms only;
//   sump     — fills up and is pumped out: days until it reaches its pump-out level and until it
//              overflows, the volume to pump out;
//   reserve  — kept full (fire water): below its minimum it needs topping up, otherwise nothing.
// A tank with an open fault flag, or whose last value is stale, needs a check before any plan: a stuck
// sensor's level is not a reason to send a lorry. Pure: the caller passes `now`.
//
// Two steps, so the worker can store the first: projectTank works from the data alone (the history
// and the latest value) and dates what it projects absolutely; planRow, at read time, applies what
// depends on the moment (open flags, a value gone stale, a projected date now passed). planTank does both.
//
// The asset's two level fields mean, by purpose:
//   supply:  reorder_pct = reorder level,          safe_fill_pct = what a delivery fills to;
//   sump:    safe_fill_pct = pump-out level,       reorder_pct = level it is pumped down to (else empty);
//   reserve: reorder_pct = minimum kept,           safe_fill_pct = what a top-up fills to (else capacity);
//   process: neither is planned with (its setpoints raise the alarms).

import { forecastConsumption, type VolumeSample } from "./consumption";
import { forecastReadiness, type Readiness } from "./readiness";

export const TANK_PURPOSES = ["supply", "process", "sump", "reserve"] as const;
export type TankPurpose = (typeof TANK_PURPOSES)[number];

/** A tank stored without a purpose (written before purposes existed) is a supply tank; other assets have none. */
export function tankPurposeOf(kind: string, purpose: TankPurpose | null | undefined): TankPurpose | null {
  return kind === "tank" ? (purpose ?? "supply") : null;
}

/** What the level fields are called on a tank of each purpose (null: not used in its plan). */
export const PURPOSE_LEVEL_NAMES: Record<TankPurpose, { reorderPct: string | null; safeFillPct: string | null }> = {
  supply: { reorderPct: "Reorder level", safeFillPct: "Safe fill" },
  process: { reorderPct: null, safeFillPct: "Safe fill" },
  sump: { reorderPct: "Pumped down to", safeFillPct: "Pump-out level" },
  reserve: { reorderPct: "Minimum level", safeFillPct: "Kept full to" },
};

/** Health flags that make a tank's level untrustworthy for planning (crosstalk is only a risk). */
const FAULT_FLAGS: ReadonlySet<string> = new Set(["drift", "stuck", "noisy", "offline", "out_of_range", "no_echo"]);

/** A value is stale after this many of its device's expected reporting intervals (PRODUCT.md: offline after 3). */
export const STALE_AFTER_INTERVALS = 3;

const MS_PER_DAY = 86_400_000;

export interface OpenFlag {
  kind: string;
  since: Date;
}

export interface TankProjectionInput {
  purpose: TankPurpose;
  capacityL: number | null;
  reorderPct: number | null;
  safeFillPct: number | null;
  /** Hourly mean volumes over the forecast window, any order. */
  series: readonly VolumeSample[];
  /** Latest valid measurement; the projection starts from it. */
  current: VolumeSample | null;
  /** A rise above this share of capacity is a refill (or, for a sump, a fall is a pump-out). */
  refillShare: number;
}

export interface PlanState {
  current: VolumeSample | null;
  openFlags: readonly OpenFlag[];
  expectedIntervalS: number;
  now: Date;
}

export type TankPlanInput = TankProjectionInput & PlanState;

export type CheckReason = { code: "flag"; flag: string; since: Date } | { code: "stale"; lastAt: Date; ageS: number } | { code: "no_value" };

export type PlanStatus =
  /** Fault flag or stale value: look at the sensor first. */
  | "needs_check"
  /** Too little or too unsteady history to forecast. */
  | "not_ready"
  /** The action is due now (the level is past its mark). */
  | "due_now"
  /** The action will be due at dueAt, after now. */
  | "due"
  /** Nothing is coming: the level is not moving towards the mark. */
  | "not_due"
  /** Process tanks: no plan, alarms only. */
  | "alarms_only"
  /** A purpose's level is missing, so nothing can be planned. */
  | "no_level_set";

/** What the data say, dated absolutely: plain data the worker can store. */
export interface TankProjection {
  purpose: TankPurpose;
  status: Exclude<PlanStatus, "needs_check">;
  action: "deliver" | "pump_out" | "top_up" | null;
  /** Words for the screen when the status needs them (not ready, not moving, no level set). */
  reason: string | null;
  /** When the mark is reached (reorder level, pump-out level), projected from the current value. */
  dueAt: Date | null;
  /** Supply: when it runs empty; sump: when it overflows. */
  limitAt: Date | null;
  /** Litres to deliver, pump out or top up, at the current value. */
  volumeL: number | null;
  /** Litres a day towards the mark (use for supply, inflow for a sump). */
  rateLPerDay: number | null;
  readiness: Readiness | null;
}

/** The row a person reads: the projection as of now, or the checks that come first. */
export interface TankPlanRow extends Omit<TankProjection, "status"> {
  status: PlanStatus;
  checks: CheckReason[];
  /** Days from now to dueAt / limitAt; dueAt and limitAt are strictly after now or null. */
  daysToDue: number | null;
  daysToLimit: number | null;
}

function projection(purpose: TankPurpose, status: TankProjection["status"], extra: Partial<TankProjection> = {}): TankProjection {
  return { purpose, status, action: null, reason: null, dueAt: null, limitAt: null, volumeL: null, rateLPerDay: null, readiness: null, ...extra };
}

/** Why a tank's level cannot be planned with: open fault flags, a stale or missing value. */
export function checksBeforePlanning(state: PlanState): CheckReason[] {
  const checks: CheckReason[] = state.openFlags.filter((f) => FAULT_FLAGS.has(f.kind)).map((f) => ({ code: "flag", flag: f.kind, since: f.since }));
  if (state.current === null) checks.push({ code: "no_value" });
  else {
    const ageS = (state.now.getTime() - state.current.at.getTime()) / 1000;
    if (ageS > STALE_AFTER_INTERVALS * state.expectedIntervalS && !state.openFlags.some((f) => f.kind === "offline")) {
      checks.push({ code: "stale", lastAt: state.current.at, ageS });
    }
  }
  return checks;
}

function pct(capacityL: number, p: number): number {
  return (capacityL * p) / 100;
}

/**
 * A falling quantity (volume for supply, room left for a sump) projected to its mark and to zero from
 * the current value, once the history is ready.
 */
function projectFalling(
  purpose: TankPurpose,
  action: "deliver" | "pump_out",
  series: readonly VolumeSample[],
  current: VolumeSample,
  markL: number,
  refillThresholdL: number,
  volumeL: number | null,
  notMoving: string,
): TankProjection {
  const readiness = forecastReadiness(series, { refillThresholdL });
  if (!readiness.ready) return projection(purpose, "not_ready", { reason: readiness.reason, readiness });
  const f = forecastConsumption(series, { refillThresholdL, reorderVolumeL: markL, currentVolumeL: current.volumeL, now: current.at });
  const rateLPerDay = f.slopeLPerDay === null ? null : -f.slopeLPerDay;
  if (rateLPerDay === null || !(rateLPerDay > 0)) return projection(purpose, "not_due", { reason: notMoving, readiness, rateLPerDay });
  return projection(purpose, "due", { action, volumeL, readiness, rateLPerDay, dueAt: f.reorderAt, limitAt: f.emptyAt });
}

/** What a tank's data say by its purpose, dated from its current value. */
export function projectTank(input: TankProjectionInput): TankProjection {
  const { purpose, capacityL, current } = input;
  if (purpose === "process") return projection(purpose, "alarms_only");
  if (current === null) return projection(purpose, "not_ready", { reason: "No measured volume yet." });
  if (!(capacityL !== null && capacityL > 0)) return projection(purpose, "no_level_set", { reason: "The tank has no capacity." });
  const thresholdL = input.refillShare * capacityL;

  if (purpose === "reserve") {
    if (input.reorderPct === null) return projection(purpose, "no_level_set", { reason: "Set the minimum level this reserve is kept above." });
    if (current.volumeL >= pct(capacityL, input.reorderPct)) return projection(purpose, "not_due");
    return projection(purpose, "due_now", { action: "top_up", volumeL: Math.max(0, pct(capacityL, input.safeFillPct ?? 100) - current.volumeL) });
  }

  if (purpose === "supply") {
    if (input.reorderPct === null) return projection(purpose, "no_level_set", { reason: "Set a reorder level to plan deliveries." });
    const reorderL = pct(capacityL, input.reorderPct);
    const deliverL = input.safeFillPct === null ? null : Math.max(0, pct(capacityL, input.safeFillPct) - current.volumeL);
    if (current.volumeL <= reorderL) return projection(purpose, "due_now", { action: "deliver", volumeL: deliverL });
    return projectFalling(purpose, "deliver", input.series, current, reorderL, thresholdL, deliverL, "The level is not falling.");
  }

  // Sump: the room left (capacity − volume) falls as it fills; a pump-out is its refill.
  if (input.safeFillPct === null) return projection(purpose, "no_level_set", { reason: "Set the pump-out level of this sump." });
  const pumpOutL = pct(capacityL, input.safeFillPct);
  const pumpedDownToL = input.reorderPct === null ? 0 : Math.min(pct(capacityL, input.reorderPct), pumpOutL);
  const volumeL = Math.max(0, current.volumeL - pumpedDownToL);
  if (current.volumeL >= pumpOutL) return projection(purpose, "due_now", { action: "pump_out", volumeL });
  const room = input.series.map((s) => ({ at: s.at, volumeL: capacityL - s.volumeL }));
  const roomNow = { at: current.at, volumeL: capacityL - current.volumeL };
  return projectFalling(purpose, "pump_out", room, roomNow, capacityL - pumpOutL, thresholdL, volumeL, "The sump is not filling.");
}

/**
 * The projection as of now: checks first (a fault flag or a stale value is looked at, not scheduled),
 * then a projected date that has passed becomes "due now", never a date in the past.
 */
export function planRow(p: TankProjection, state: PlanState): TankPlanRow {
  const base = { ...p, checks: [] as CheckReason[], daysToDue: null as number | null, daysToLimit: null as number | null };
  if (p.status === "alarms_only") return base;
  const checks = checksBeforePlanning(state);
  if (checks.length) return { ...base, status: "needs_check", action: null, reason: null, dueAt: null, limitAt: null, volumeL: null, checks };
  const nowMs = state.now.getTime();
  const ahead = (at: Date | null) => (at !== null && at.getTime() > nowMs ? at : null);
  const daysTo = (at: Date | null) => (at === null ? null : Math.max(0, (at.getTime() - nowMs) / MS_PER_DAY));
  const passed = p.status === "due" && p.dueAt !== null && p.dueAt.getTime() <= nowMs;
  return {
    ...base,
    status: passed ? "due_now" : p.status,
    dueAt: ahead(p.dueAt),
    daysToDue: daysTo(p.dueAt),
    limitAt: ahead(p.limitAt),
    daysToLimit: daysTo(p.limitAt),
  };
}

/** The plan row of one tank by its purpose, history and state. */
export function planTank(input: TankPlanInput): TankPlanRow {
  return planRow(projectTank(input), input);
}
