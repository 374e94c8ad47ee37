// The refill plan: tanks that reach their reorder level within a horizon, soonest first, with the
// volume a delivery must bring to reach the tank's safe fill. Built on the live asset state (latest
// valid measurement) that the overview screens use and the worker's stored forecasts.

import { type Scope } from "../db/site-scope";
import { listTankForecasts, type ForecastJson } from "./forecasts";
import { listAssetStates, type AssetStateJson } from "./overview";
import { listSites } from "../services/sites";

const DAY_MS = 86_400_000;

export interface RefillPlanRow {
  asset_id: string;
  asset_name: string;
  site_id: string;
  site_name: string;
  site_time_zone: string;
  /** When the tank reaches its reorder level; now when it is already at or below it. */
  due_at: string;
  reason: "below_reorder" | "forecast";
  days_to_reorder: number;
  days_to_empty: number | null;
  current_volume_l: number | null;
  fill_pct: number | null;
  capacity_l: number | null;
  safe_fill_pct: number | null;
  reorder_pct: number | null;
  /** capacity · safe fill % − current volume; null when the safe fill or the volume is unknown. */
  deliver_l: number | null;
  measured_at: string | null;
  forecast_at: string | null;
}

/** Pure: the plan from asset states and forecasts, for tanks due within `horizonDays` of `now`, soonest first. */
export function buildRefillPlan(
  states: readonly AssetStateJson[],
  forecasts: ReadonlyMap<string, ForecastJson>,
  sitesById: ReadonlyMap<string, { name: string; time_zone: string }>,
  horizonDays: number,
  now: Date,
): RefillPlanRow[] {
  const horizonEnd = now.getTime() + horizonDays * DAY_MS;
  const rows: RefillPlanRow[] = [];
  for (const s of states) {
    if (s.kind !== "tank") continue;
    const volume = s.latest?.volume_l ?? null;
    const fill = s.latest?.fill_pct ?? null;
    const below = fill !== null && s.reorder_pct !== null && fill <= s.reorder_pct;
    const forecast = forecasts.get(s.id) ?? null;
    const forecastDue = forecast?.reorder_at ? new Date(forecast.reorder_at).getTime() : null;
    let dueMs: number | null = null;
    if (below) dueMs = now.getTime();
    else if (forecastDue !== null && forecastDue <= horizonEnd) dueMs = Math.max(forecastDue, now.getTime());
    if (dueMs === null) continue;
    const target = s.capacity_l !== null && s.safe_fill_pct !== null ? (s.capacity_l * s.safe_fill_pct) / 100 : null;
    rows.push({
      asset_id: s.id,
      asset_name: s.name,
      site_id: s.site_id,
      site_name: sitesById.get(s.site_id)?.name ?? "",
      site_time_zone: sitesById.get(s.site_id)?.time_zone ?? "UTC",
      due_at: new Date(dueMs).toISOString(),
      reason: below ? "below_reorder" : "forecast",
      days_to_reorder: Math.max(0, (dueMs - now.getTime()) / DAY_MS),
      days_to_empty: forecast?.days_to_empty ?? null,
      current_volume_l: volume,
      fill_pct: fill,
      capacity_l: s.capacity_l,
      safe_fill_pct: s.safe_fill_pct,
      reorder_pct: s.reorder_pct,
      deliver_l: target !== null && volume !== null ? Math.max(0, target - volume) : null,
      measured_at: s.latest?.at ?? null,
      forecast_at: forecast ? new Date(forecast.computed_at).toISOString() : null,
    });
  }
  return rows.sort((a, b) => a.due_at.localeCompare(b.due_at) || a.site_name.localeCompare(b.site_name) || a.asset_name.localeCompare(b.asset_name));
}

export async function refillPlan(scope: Scope, options: { horizonDays: number; siteId?: string }, now = new Date()) {
  const [states, forecasts, sites] = await Promise.all([
    listAssetStates(scope, { siteId: options.siteId }),
    listTankForecasts(scope, { siteId: options.siteId }),
    listSites(scope),
  ]);
  const sitesById = new Map(sites.map((s) => [s.id, s]));
  const byAsset = new Map(forecasts.map((f) => [f.asset_id, f]));
  return { horizon_days: options.horizonDays, generated_at: now.toISOString(), items: buildRefillPlan(states, byAsset, sitesById, options.horizonDays, now) };
}
export type RefillPlanJson = Awaited<ReturnType<typeof refillPlan>>;
