// What a tank is for decides what its plan says (PRODUCT.md, "Things in the system"):
//   supply   — drawn down and reordered: days to the reorder level and to empty, a delivery volume;
//   process  — a buffer in a process: no reorder, its alarms only;
//   sump     — fills up and is pumped out: days until it reaches its pump-out level and until it
//              overflows, the volume to pump out;
//   reserve  — kept full (fire water): below its minimum it needs topping up, otherwise nothing.
// A tank with an open fault flag, or whose last value is stale, needs a check before any plan: a stuck
// sensor's level is not a reason to send a lorry. Pure: the caller passes `now`.
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

export interface TankPlanInput {
  purpose: TankPurpose;
  capacityL: number | null;
  reorderPct: number | null;
  safeFillPct: number | null;
  /** Hourly mean volumes over the forecast window, any order. */
  series: readonly VolumeSample[];
  /** Latest valid measurement. */
  current: VolumeSample | null;
  openFlags: readonly OpenFlag[];
  expectedIntervalS: number;
  /** A rise above this share of capacity is a refill (or, for a sump, a fall is a pump-out). */
  refillShare: number;
  now: Date;
}

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

export interface TankPlanRow {
  purpose: TankPurpose;
  status: PlanStatus;
  action: "deliver" | "pump_out" | "top_up" | null;
  /** Words for the screen when the status needs them (not ready, no level set); checks are in `checks`. */
  reason: string | null;
  checks: CheckReason[];
  /** Strictly after now when status is "due"; null otherwise (a due-now row has no date to show). */
  dueAt: Date | null;
  daysToDue: number | null;
  /** Supply: when it runs empty; sump: when it overflows. Never before now. */
  limitAt: Date | null;
  daysToLimit: number | null;
  /** Litres to deliver, pump out or top up. */
  volumeL: number | null;
  /** Litres a day towards the mark (use for supply, inflow for a sump). */
  rateLPerDay: number | null;
  readiness: Readiness | null;
}

function blankRow(purpose: TankPurpose, status: PlanStatus, extra: Partial<TankPlanRow> = {}): TankPlanRow {
  return { purpose, status, action: null, reason: null, checks: [], dueAt: null, daysToDue: null, limitAt: null, daysToLimit: null, volumeL: null, rateLPerDay: null, readiness: null, ...extra };
}

/** Why a tank's level cannot be planned with: open fault flags, a stale or missing value. */
export function checksBeforePlanning(input: Pick<TankPlanInput, "current" | "openFlags" | "expectedIntervalS" | "now">): CheckReason[] {
  const checks: CheckReason[] = input.openFlags.filter((f) => FAULT_FLAGS.has(f.kind)).map((f) => ({ code: "flag", flag: f.kind, since: f.since }));
  if (input.current === null) checks.push({ code: "no_value" });
  else {
    const ageS = (input.now.getTime() - input.current.at.getTime()) / 1000;
    if (ageS > STALE_AFTER_INTERVALS * input.expectedIntervalS && !input.openFlags.some((f) => f.kind === "offline")) {
      checks.push({ code: "stale", lastAt: input.current.at, ageS });
    }
  }
  return checks;
}

interface Projection {
  dueNow: boolean;
  fields: Pick<TankPlanRow, "dueAt" | "daysToDue" | "limitAt" | "daysToLimit" | "rateLPerDay">;
}

/**
 * Projects a falling quantity (volume for supply, room left for a sump) to its mark and to zero, from
 * the current value's time, and states the result relative to now: a mark the projection says was
 * crossed before now is "due now", never a date in the past.
 */
function project(series: readonly VolumeSample[], current: VolumeSample, markL: number, refillThresholdL: number, now: Date): Projection {
  const f = forecastConsumption(series, { refillThresholdL, reorderVolumeL: markL, currentVolumeL: current.volumeL, now: current.at });
  const nowMs = now.getTime();
  const fromNow = (at: Date | null) => (at === null ? null : Math.max(0, (at.getTime() - nowMs) / MS_PER_DAY));
  const future = (at: Date | null) => (at !== null && at.getTime() > nowMs ? at : null);
  const rateLPerDay = f.slopeLPerDay === null ? null : -f.slopeLPerDay;
  const dueNow = f.reorderAt !== null && f.reorderAt.getTime() <= nowMs;
  return { dueNow, fields: { dueAt: future(f.reorderAt), daysToDue: fromNow(f.reorderAt), limitAt: future(f.emptyAt), daysToLimit: fromNow(f.emptyAt), rateLPerDay } };
}

function pct(capacityL: number, p: number): number {
  return (capacityL * p) / 100;
}

/** The plan row of one tank by its purpose, history and state. */
export function planTank(input: TankPlanInput): TankPlanRow {
  const { purpose, capacityL, current, now } = input;
  if (purpose === "process") return blankRow(purpose, "alarms_only");
  const checks = checksBeforePlanning(input);
  if (checks.length || current === null) return blankRow(purpose, "needs_check", { checks });
  if (!(capacityL !== null && capacityL > 0)) return blankRow(purpose, "no_level_set", { reason: "The tank has no capacity." });
  const thresholdL = input.refillShare * capacityL;

  if (purpose === "reserve") {
    if (input.reorderPct === null) return blankRow(purpose, "no_level_set", { reason: "Set the minimum level this reserve is kept above." });
    const keptFullL = pct(capacityL, input.safeFillPct ?? 100);
    if (current.volumeL < pct(capacityL, input.reorderPct)) {
      return blankRow(purpose, "due_now", { action: "top_up", volumeL: Math.max(0, keptFullL - current.volumeL) });
    }
    return blankRow(purpose, "not_due");
  }

  if (purpose === "supply") {
    if (input.reorderPct === null) return blankRow(purpose, "no_level_set", { reason: "Set a reorder level to plan deliveries." });
    const reorderL = pct(capacityL, input.reorderPct);
    const deliverL = input.safeFillPct === null ? null : Math.max(0, pct(capacityL, input.safeFillPct) - current.volumeL);
    if (current.volumeL <= reorderL) return blankRow(purpose, "due_now", { action: "deliver", volumeL: deliverL });
    const readiness = forecastReadiness(input.series, { refillThresholdL: thresholdL });
    if (!readiness.ready) return blankRow(purpose, "not_ready", { reason: readiness.reason, readiness });
    const p = project(input.series, current, reorderL, thresholdL, now);
    const rate = p.fields.rateLPerDay;
    if (rate === null || !(rate > 0)) return blankRow(purpose, "not_due", { reason: "The level is not falling.", readiness, rateLPerDay: rate });
    return blankRow(purpose, p.dueNow ? "due_now" : "due", { action: "deliver", volumeL: deliverL, readiness, ...p.fields });
  }

  // Sump: project the room left (capacity − volume), which falls as the sump fills; a pump-out is its refill.
  if (input.safeFillPct === null) return blankRow(purpose, "no_level_set", { reason: "Set the pump-out level of this sump." });
  const pumpOutL = pct(capacityL, input.safeFillPct);
  const pumpedDownToL = input.reorderPct === null ? 0 : Math.min(pct(capacityL, input.reorderPct), pumpOutL);
  const volumeL = Math.max(0, current.volumeL - pumpedDownToL);
  if (current.volumeL >= pumpOutL) return blankRow(purpose, "due_now", { action: "pump_out", volumeL });
  const room = input.series.map((s) => ({ at: s.at, volumeL: capacityL - s.volumeL }));
  const roomNow = { at: current.at, volumeL: capacityL - current.volumeL };
  const readiness = forecastReadiness(room, { refillThresholdL: thresholdL });
  if (!readiness.ready) return blankRow(purpose, "not_ready", { reason: readiness.reason, readiness });
  const p = project(room, roomNow, capacityL - pumpOutL, thresholdL, now);
  const rate = p.fields.rateLPerDay;
  if (rate === null || !(rate > 0)) return blankRow(purpose, "not_due", { reason: "The sump is not filling.", readiness, rateLPerDay: rate });
  return blankRow(purpose, p.dueNow ? "due_now" : "due", { action: "pump_out", volumeL, readiness, ...p.fields });
}
