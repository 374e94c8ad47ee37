// Tank forecasts as the worker stores them (tank_forecasts, refreshed every few minutes from hourly
// rollups), for the asset screen and the refill plan. Days are counted from now, not from when the
// forecast was computed.

import { siteScope, type Scope } from "../db/site-scope";
import { findAsset } from "../services/assets";
import { sqlRows } from "../db/sql";

interface ForecastRow {
  asset_id: string;
  computed_at: Date;
  window_start: Date;
  window_end: Date;
  samples: number;
  current_volume_l: number | null;
  reorder_volume_l: number | null;
  slope_l_per_day: number | null;
  reorder_at: Date | null;
  empty_at: Date | null;
  refills: string[];
}

const DAY_MS = 86_400_000;

function daysUntil(at: Date | null, now: Date): number | null {
  return at === null ? null : Math.max(0, (at.getTime() - now.getTime()) / DAY_MS);
}

export function serialiseForecast(f: ForecastRow, now = new Date()) {
  return {
    asset_id: f.asset_id,
    computed_at: f.computed_at,
    window_start: f.window_start,
    window_end: f.window_end,
    samples: f.samples,
    current_volume_l: f.current_volume_l,
    reorder_volume_l: f.reorder_volume_l,
    /** Litres a day; negative while the tank is drawn down. */
    slope_l_per_day: f.slope_l_per_day,
    days_to_reorder: daysUntil(f.reorder_at, now),
    days_to_empty: daysUntil(f.empty_at, now),
    reorder_at: f.reorder_at,
    empty_at: f.empty_at,
    refills: f.refills,
  };
}
export type ForecastJson = ReturnType<typeof serialiseForecast>;

const SELECT = `SELECT f.asset_id, f.computed_at, f.window_start, f.window_end, f.samples, f.current_volume_l, f.reorder_volume_l,
                       f.slope_l_per_day, f.reorder_at, f.empty_at, f.refills
                FROM tank_forecasts f JOIN assets a ON a.id = f.asset_id`;

/** The stored forecast of one tank of the organisation, or null before the worker has made one. */
export async function getTankForecast(scope: Scope, assetId: string): Promise<ForecastJson | null> {
  await findAsset(scope, assetId);
  const [row] = await sqlRows<ForecastRow>(`${SELECT} WHERE f.asset_id = $1 AND a.organisation_id = $2 AND ${siteScope(scope, "a.site_id")}`, [assetId, scope.organisationId]);
  return row ? serialiseForecast(row) : null;
}

/** Every stored tank forecast of the organisation (optionally one site), soonest reorder first. */
export async function listTankForecasts(scope: Scope, filter: { siteId?: string } = {}): Promise<ForecastJson[]> {
  const rows = await sqlRows<ForecastRow>(
    `${SELECT} WHERE a.organisation_id = $1 AND ${siteScope(scope, "a.site_id")} AND ($2::uuid IS NULL OR a.site_id = $2) ORDER BY f.reorder_at NULLS LAST, f.empty_at NULLS LAST`,
    [scope.organisationId, filter.siteId ?? null],
  );
  const now = new Date();
  return rows.map((r) => serialiseForecast(r, now));
}
