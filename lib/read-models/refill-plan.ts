// The refill plan, by purpose (lib/forecast/purpose.ts, through tankPlanOf): supply tanks to deliver to
// by their reorder date, sumps to pump out before their pump-out level, reserves below their minimum
// to top up; process tanks have alarms only and are not listed. A tank with an open fault flag or a
// stale value "needs a check" and is not scheduled; a tank without a ready forecast is listed apart,
// with why. Built on the live asset states the overview screens use, so every screen says the same.

import { type Scope } from "../db/site-scope";
import { listAssetStates, type AssetStateJson } from "./overview";
import type { PlanCheckJson, TankPlanJson } from "./forecasts";
import type { TankPurpose } from "../forecast/purpose";
import { listSites } from "../services/sites";

const DAY_MS = 86_400_000;

interface TankColumns {
  asset_id: string;
  asset_name: string;
  site_id: string;
  site_name: string;
  site_time_zone: string;
  purpose: TankPurpose;
  current_volume_l: number | null;
  fill_pct: number | null;
  capacity_l: number | null;
  safe_fill_pct: number | null;
  reorder_pct: number | null;
  measured_at: string | null;
  forecast_at: string | null;
}

export interface RefillPlanRow extends TankColumns {
  /** needs_check: look at the sensor first, not scheduled; due_now: the level is past its mark; due: by due_at. */
  status: "needs_check" | "due_now" | "due";
  /** deliver (supply), pump_out (sump), top_up (reserve below its minimum); null when it needs a check. */
  action: TankPlanJson["action"];
  /** When the action is due: now when due now, the projected date (after now), null when it needs a check. */
  due_at: string | null;
  days_to_due: number | null;
  /** Supply: when it runs empty; sump: when it overflows; after now, else null. */
  limit_at: string | null;
  days_to_limit: number | null;
  /** Litres to deliver (to safe fill), pump out (to its pumped-down level) or top up. */
  volume_l: number | null;
  checks: PlanCheckJson[];
}

export interface UnplannedRow extends TankColumns {
  status: "not_ready" | "no_level_set";
  /** Why there is no forecast or plan, in words. */
  reason: string | null;
}

const STATUS_ORDER = { needs_check: 0, due_now: 1, due: 2 } as const;

/** Pure: the plan from asset states (with their plan verdicts) for actions due within `horizonDays` of `now`. */
export function buildRefillPlan(
  states: readonly AssetStateJson[],
  sitesById: ReadonlyMap<string, { name: string; time_zone: string }>,
  horizonDays: number,
  now: Date,
): { items: RefillPlanRow[]; unplanned: UnplannedRow[] } {
  const horizonEnd = now.getTime() + horizonDays * DAY_MS;
  const items: RefillPlanRow[] = [];
  const unplanned: UnplannedRow[] = [];
  for (const s of states) {
    const plan = s.plan;
    if (plan === null) continue;
    const tank: TankColumns = {
      asset_id: s.id,
      asset_name: s.name,
      site_id: s.site_id,
      site_name: sitesById.get(s.site_id)?.name ?? "",
      site_time_zone: sitesById.get(s.site_id)?.time_zone ?? "UTC",
      purpose: plan.purpose,
      current_volume_l: s.latest?.volume_l ?? null,
      fill_pct: s.latest?.fill_pct ?? null,
      capacity_l: s.capacity_l,
      safe_fill_pct: s.safe_fill_pct,
      reorder_pct: s.reorder_pct,
      measured_at: s.latest?.at ?? null,
      forecast_at: plan.computed_at,
    };
    const when = { limit_at: plan.limit_at, days_to_limit: plan.days_to_limit, volume_l: plan.volume_l, checks: plan.checks, action: plan.action };
    if (plan.status === "needs_check") items.push({ ...tank, ...when, status: "needs_check", due_at: null, days_to_due: null });
    else if (plan.status === "due_now") items.push({ ...tank, ...when, status: "due_now", due_at: now.toISOString(), days_to_due: 0 });
    else if (plan.status === "due" && plan.due_at !== null && Date.parse(plan.due_at) <= horizonEnd) {
      items.push({ ...tank, ...when, status: "due", due_at: plan.due_at, days_to_due: plan.days_to_due });
    } else if ((plan.status === "not_ready" || plan.status === "no_level_set") && plan.purpose !== "process") {
      unplanned.push({ ...tank, status: plan.status, reason: plan.reason });
    }
  }
  const byName = (a: TankColumns, b: TankColumns) => a.site_name.localeCompare(b.site_name) || a.asset_name.localeCompare(b.asset_name);
  items.sort((a, b) => STATUS_ORDER[a.status] - STATUS_ORDER[b.status] || (a.due_at ?? "").localeCompare(b.due_at ?? "") || byName(a, b));
  unplanned.sort(byName);
  return { items, unplanned };
}

export async function refillPlan(scope: Scope, options: { horizonDays: number; siteId?: string }, now = new Date()) {
  const [states, sites] = await Promise.all([listAssetStates(scope, { siteId: options.siteId }, now), listSites(scope)]);
  const sitesById = new Map(sites.map((s) => [s.id, s]));
  return { horizon_days: options.horizonDays, generated_at: now.toISOString(), ...buildRefillPlan(states, sitesById, options.horizonDays, now) };
}
export type RefillPlanJson = Awaited<ReturnType<typeof refillPlan>>;
