// Tank plans as every screen shows them: the worker's stored projection (tank_forecasts, by purpose,
// refreshed every few minutes from hourly rollups) put through planRow at the moment of reading — a
// tank with an open fault flag or a stale value "needs a check", a projected date that has passed is
// "now", days are counted from now. The overview, site, asset and refill-plan screens all read the
// verdict from tankPlanOf, so they cannot disagree.

import { planRow, tankPurposeOf, type CheckReason, type OpenFlag, type PlanStatus, type TankProjection, type TankPurpose } from "../forecast/purpose";

type Instant = Date | string | null;

/** The stored projection as the read models select it (FORECAST_JSON: its dates arrive as strings). */
export interface StoredForecastJson {
  computed_at: Instant;
  purpose: TankPurpose;
  status: TankProjection["status"];
  action: TankProjection["action"];
  reason: string | null;
  ready: boolean | null;
  span_hours: number | null;
  points: number | null;
  r_squared: number | null;
  due_at: Instant;
  limit_at: Instant;
  volume_l: number | null;
  rate_l_per_day: number | null;
}

/** SQL: the stored projection as one JSON column (null without one) from tank_forecasts aliased `f`. */
export const FORECAST_JSON = `CASE WHEN f.asset_id IS NULL THEN NULL ELSE json_build_object(
  'computed_at', f.computed_at, 'purpose', f.purpose, 'status', f.status, 'action', f.action, 'reason', f.reason, 'ready', f.ready,
  'span_hours', f.span_hours, 'points', f.points, 'r_squared', f.r_squared, 'due_at', f.due_at, 'limit_at', f.limit_at,
  'volume_l', f.volume_l, 'rate_l_per_day', f.rate_l_per_day) END`;

const date = (at: Instant) => (at === null ? null : new Date(at));
const iso = (at: Date | null) => (at === null ? null : at.toISOString());

/** A projection stored by the worker (dates may arrive as JSON strings). */
function projectionOf(f: StoredForecastJson): TankProjection {
  return {
    purpose: f.purpose,
    status: f.status,
    action: f.action,
    reason: f.reason,
    dueAt: date(f.due_at),
    limitAt: date(f.limit_at),
    volumeL: f.volume_l,
    rateLPerDay: f.rate_l_per_day,
    readiness:
      f.ready === null ? null : { ready: f.ready, reason: f.ready ? null : f.reason, spanHours: f.span_hours ?? 0, points: f.points ?? 0, rSquared: f.r_squared },
  };
}

export interface TankPlanInput {
  kind: string;
  purpose: TankPurpose | null;
  forecast: StoredForecastJson | null;
  /** The latest valid measurement. */
  latest: { at: Instant; volume_l: number | null } | null;
  flags: readonly { flag: string; since: Instant }[];
  /** The device's expected reporting interval; null without a channel. */
  expectedIntervalS: number | null;
  now: Date;
}

function span(seconds: number): string {
  const minutes = Math.floor(seconds / 60);
  if (minutes < 120) return `${minutes} min`;
  const hours = Math.floor(minutes / 60);
  return hours < 48 ? `${hours} h` : `${Math.floor(hours / 24)} d`;
}

/** A check with the words every screen and export shows for it. */
function checkJson(c: CheckReason, expectedIntervalS: number | null) {
  if (c.code === "flag") return { code: c.code, text: `Sensor flagged ${c.flag.replace(/_/g, " ")}`, flag: c.flag, since: c.since.toISOString() };
  if (c.code === "stale") {
    const expected = expectedIntervalS === null ? "" : ` (expected every ${span(expectedIntervalS)})`;
    return { code: c.code, text: `No value for ${span(c.ageS)}${expected}`, last_at: c.lastAt.toISOString(), age_s: c.ageS };
  }
  return { code: c.code, text: "No measured value yet" };
}
export type PlanCheckJson = ReturnType<typeof checkJson>;

export interface TankPlanJson {
  purpose: TankPurpose;
  status: PlanStatus;
  action: TankProjection["action"];
  /** Why not ready, not moving or not plannable, in words; null otherwise. */
  reason: string | null;
  /** Why it needs a check (fault flags, a stale or missing value); empty otherwise. */
  checks: PlanCheckJson[];
  /** When the mark is reached: strictly after now, or null (due now, not due, not ready). */
  due_at: string | null;
  /** Supply: empty; sump: overflowing. Strictly after now, or null. */
  limit_at: string | null;
  days_to_due: number | null;
  days_to_limit: number | null;
  /** Litres to deliver, pump out or top up. */
  volume_l: number | null;
  rate_l_per_day: number | null;
  readiness: { ready: boolean; span_hours: number; points: number; r_squared: number | null } | null;
  computed_at: string | null;
}

const NOT_PROJECTED = "No forecast yet: the tank has not been projected from its measurements.";

/** The plan verdict of one tank as of `now`; null for an asset that is not a tank. */
export function tankPlanOf(input: TankPlanInput): TankPlanJson | null {
  const purpose = tankPurposeOf(input.kind, input.purpose);
  if (purpose === null) return null;
  const f = input.forecast;
  // The asset's purpose decides; a projection made before the purpose changed waits for the worker.
  const projection: TankProjection =
    f && f.purpose === purpose
      ? projectionOf(f)
      : purpose === "process"
        ? { purpose, status: "alarms_only", action: null, reason: null, dueAt: null, limitAt: null, volumeL: null, rateLPerDay: null, readiness: null }
        : { purpose, status: "not_ready", action: null, reason: NOT_PROJECTED, dueAt: null, limitAt: null, volumeL: null, rateLPerDay: null, readiness: null };
  const latest = input.latest;
  const current = latest && latest.at !== null && latest.volume_l !== null ? { at: new Date(latest.at), volumeL: latest.volume_l } : null;
  const openFlags: OpenFlag[] = input.flags.map((fl) => ({ kind: fl.flag, since: new Date(fl.since ?? input.now) }));
  const row = planRow(projection, { current, openFlags, expectedIntervalS: input.expectedIntervalS ?? Number.POSITIVE_INFINITY, now: input.now });
  return {
    purpose: row.purpose,
    status: row.status,
    action: row.action,
    reason: row.reason,
    checks: row.checks.map((c) => checkJson(c, input.expectedIntervalS)),
    due_at: iso(row.dueAt),
    limit_at: iso(row.limitAt),
    days_to_due: row.daysToDue,
    days_to_limit: row.daysToLimit,
    volume_l: row.volumeL,
    rate_l_per_day: row.rateLPerDay,
    readiness: row.readiness ? { ready: row.readiness.ready, span_hours: row.readiness.spanHours, points: row.readiness.points, r_squared: row.readiness.rSquared } : null,
    computed_at: f ? new Date(f.computed_at ?? input.now).toISOString() : null,
  };
}
