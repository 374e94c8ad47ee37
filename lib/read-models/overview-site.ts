import { siteScope, type Scope } from "../db/site-scope";
import { notFound } from "../errors";
import { deviceCountsBySite, listAssetStates, type AssetStateJson } from "./overview";
import { listAttentionAlarms, setpointsByAsset, type SetpointJson } from "./overview-alarms";
import { sqlRows } from "../db/sql";

// The site screen: its tanks with the last day's trend and range, its bays as they stand, its points,
// its alarms needing attention and its devices. Hourly rollups keep the day's trend small and cheap.

const HOUR_S = 3600;

interface TrendRow {
  asset_id: string;
  kind: "tank" | "point";
  at_ms: number;
  mean: number | null;
  lo: number | null;
  hi: number | null;
}

/** A point of the day's trend: [epoch ms of the hour, mean level in m or null]. */
export type TrendPair = [number, number | null];

interface DayTrend {
  trend: TrendPair[];
  range: [number, number] | null;
}

/**
 * The last day from the hourly rollups: a tank's hourly mean level and its range, a point's range of
 * distance (bays show their state, not a trend).
 */
async function dayTrends(organisationId: string, siteId: string, since: Date): Promise<Map<string, DayTrend>> {
  const rows = await sqlRows<TrendRow>(
    `SELECT r.asset_id, a.kind, (extract(epoch FROM r.bucket_start) * 1000)::float8 AS at_ms,
            -- To 0.1 mm: finer than any sensor here reads, and a quarter of the digits.
            round((CASE WHEN a.kind = 'tank' THEN sum(r.level_sum) ELSE sum(r.distance_sum) END / NULLIF(sum(r.n), 0))::numeric, 4)::float8 AS mean,
            CASE WHEN a.kind = 'tank' THEN min(r.level_min) ELSE min(r.distance_min) END AS lo,
            CASE WHEN a.kind = 'tank' THEN max(r.level_max) ELSE max(r.distance_max) END AS hi
     FROM measurement_rollups r JOIN assets a ON a.id = r.asset_id
     WHERE a.organisation_id = $1 AND a.site_id = $2 AND a.kind IN ('tank', 'point')
       AND r.bucket_s = $3 AND r.bucket_start >= $4
     GROUP BY r.asset_id, a.kind, r.bucket_start
     ORDER BY r.asset_id, r.bucket_start`,
    [organisationId, siteId, HOUR_S, since],
    { name: "site_day_trends" },
  );
  const out = new Map<string, DayTrend>();
  for (const r of rows) {
    const t = out.get(r.asset_id) ?? { trend: [], range: null };
    if (r.kind === "tank") t.trend.push([r.at_ms, r.mean]);
    if (r.lo != null && r.hi != null) t.range = t.range ? [Math.min(t.range[0], r.lo), Math.max(t.range[1], r.hi)] : [r.lo, r.hi];
    out.set(r.asset_id, t);
  }
  return out;
}

function withDay(asset: AssetStateJson, day: DayTrend | undefined, setpoints: SetpointJson[]) {
  return { ...asset, setpoints: asset.kind === "tank" ? setpoints : [], day: day ?? { trend: [], range: null } };
}

/** Everything the site screen shows, for one site of the organisation (404 for another's). */
export async function siteOverview(scope: Scope, siteId: string, now = new Date()) {
  const { organisationId } = scope;
  const since = new Date(Math.floor((now.getTime() - 24 * HOUR_S * 1000) / (HOUR_S * 1000)) * HOUR_S * 1000);
  // Every query is scoped to the organisation, so they all run at once; another's site is still a 404.
  const [[site], assets, trends, alarms, devices, setpoints] = await Promise.all([
    sqlRows<{ id: string; name: string; time_zone: string; air_temp_c: number | null }>(
      `SELECT id, name, time_zone, air_temp_c FROM sites WHERE id = $1 AND organisation_id = $2 AND ${siteScope(scope, "id")}`,
      [siteId, organisationId],
      { name: "site_in_scope" },
    ),
    listAssetStates(scope, { siteId }, now),
    dayTrends(organisationId, siteId, since),
    listAttentionAlarms(scope, { siteId }),
    deviceCountsBySite(scope, now, siteId),
    setpointsByAsset(scope, { siteId }),
  ]);
  if (!site) throw notFound("That site");
  const detailed = assets.map((a) => withDay(a, trends.get(a.id), setpoints.get(a.id) ?? []));
  return {
    generated_at: now.toISOString(),
    site: { id: site.id, name: site.name, time_zone: site.time_zone, air_temp_c: site.air_temp_c ?? null },
    devices: devices.get(siteId) ?? { total: 0, offline: 0 },
    tanks: detailed.filter((a) => a.kind === "tank"),
    bays: detailed.filter((a) => a.kind === "bay"),
    points: detailed.filter((a) => a.kind === "point"),
    alarms,
  };
}
export type SiteOverviewJson = Awaited<ReturnType<typeof siteOverview>>;
export type SiteAssetJson = SiteOverviewJson["tanks"][number];
