import { siteScope, type Scope } from "../db/site-scope";
import { tankHeight, type TankGeometry } from "../geometry/tank-volume";
import { detectOffline } from "../health/flags";
import type { AssetKind } from "../db/models";
import { activeAlarmsBySite, type PriorityCounts } from "./overview-alarms";
import { FORECAST_JSON, tankPlanOf, type StoredForecastJson } from "./forecasts";
import type { TankPurpose } from "../forecast/purpose";
import { sqlRows } from "../db/sql";

// The live state of assets as the overview, site and asset screens show it: each asset's latest valid
// measurement, its open health flags, a bay's current occupancy and a tank's forecast. Always scoped
// to one organisation; the caller narrows it to a site or an asset.

export interface OpenFlag {
  channel_id: string;
  flag: string;
  since: string;
  magnitude: number | null;
}

interface AssetStateRow {
  id: string;
  site_id: string;
  kind: AssetKind;
  purpose: TankPurpose | null;
  name: string;
  capacity_l: number | null;
  safe_fill_pct: number | null;
  reorder_pct: number | null;
  mount_height_m: number | null;
  geometry: TankGeometry | null;
  floor_distance_m: number | null;
  occupied_below_m: number | null;
  bay_row: number | null;
  bay_col: number | null;
  bay_level: string | null;
  channel_id: string | null;
  device_id: string | null;
  device_name: string | null;
  expected_interval_s: number | null;
  last_seen_at: Date | null;
  value_at: Date | null;
  level_m: number | null;
  distance_m: number | null;
  volume_l: number | null;
  fill_pct: number | null;
  uncertainty_m: number | null;
  occupied: boolean | null;
  session_started_at: Date | null;
  session_ended_at: Date | null;
  forecast: StoredForecastJson | null;
  flags: OpenFlag[] | null;
}

// One channel stands for each asset: the one heard from most recently (an asset normally has one),
// with its newest valid measurement as the worker keeps it in channel_latest. Every table here is
// small (a row per channel, device, asset or open flag), so they are hash-joined whole; no statement
// reads the measurements. A channel measures an asset of its device's site (lib/services/devices.ts),
// so a site narrows both.
function channelCte(scope: Scope, narrow = "") {
  return `ch AS (
    SELECT DISTINCT ON (c.asset_id) c.asset_id, c.id, c.device_id, d.name AS device_name, d.expected_interval_s,
           COALESCE(cs.last_at, d.last_seen_at) AS last_seen_at,
           cl.at AS value_at, cl.level_m, cl.distance_m, cl.volume_l, cl.fill_pct, cl.uncertainty_m, cl.occupied
    FROM channels c JOIN devices d ON d.id = c.device_id LEFT JOIN channel_state cs ON cs.channel_id = c.id
    LEFT JOIN channel_latest cl ON cl.channel_id = c.id
    WHERE d.organisation_id = $1 AND ${siteScope(scope, "d.site_id")} AND c.asset_id IS NOT NULL ${narrow}
    ORDER BY c.asset_id, cs.last_at DESC NULLS LAST, c.id
  )`;
}

function flagsCte(scope: Scope, narrow = "") {
  return `fl AS (
    SELECT c.asset_id, json_agg(json_build_object('channel_id', h.channel_id, 'flag', h.flag, 'since', h.since, 'magnitude', h.magnitude) ORDER BY h.since) AS flags
    FROM health_flags h JOIN channels c ON c.id = h.channel_id JOIN devices d ON d.id = c.device_id
    WHERE h.cleared_at IS NULL AND d.organisation_id = $1 AND ${siteScope(scope, "d.site_id")} AND c.asset_id IS NOT NULL ${narrow}
    GROUP BY c.asset_id
  )`;
}

const LATEST_COLUMNS = `ch.value_at, ch.level_m, ch.distance_m, ch.volume_l, ch.fill_pct, ch.uncertainty_m, ch.occupied`;

const SESSION_JOIN = `
  LEFT JOIN LATERAL (
    SELECT s.started_at, s.ended_at FROM occupancy_sessions s WHERE s.asset_id = a.id AND a.kind = 'bay' ORDER BY s.started_at DESC LIMIT 1
  ) os ON true`;

function assetStateSql(scope: Scope, filter: { siteId?: string; assetId?: string }) {
  // $1 the organisation, then the site and the asset where given.
  const siteParam = filter.siteId ? "$2" : "";
  const assetParam = filter.assetId ? (filter.siteId ? "$3" : "$2") : "";
  const narrow = [siteParam ? `AND d.site_id = ${siteParam}` : "", assetParam ? `AND c.asset_id = ${assetParam}` : ""].join(" ");
  const where = [siteParam ? `AND a.site_id = ${siteParam}` : "", assetParam ? `AND a.id = ${assetParam}` : ""].join(" ");
  return `
  WITH ${channelCte(scope, narrow)}, ${flagsCte(scope, narrow)}
  SELECT a.id, a.site_id, a.kind, a.purpose, a.name, a.capacity_l, a.safe_fill_pct, a.reorder_pct, a.mount_height_m, a.geometry,
         a.floor_distance_m, a.occupied_below_m, a.bay_row, a.bay_col, a.bay_level,
         ch.id AS channel_id, ch.device_id, ch.device_name, ch.expected_interval_s, ch.last_seen_at,
         ${LATEST_COLUMNS},
         os.started_at AS session_started_at, os.ended_at AS session_ended_at,
         ${FORECAST_JSON} AS forecast,
         fl.flags
  FROM assets a
  LEFT JOIN ch ON ch.asset_id = a.id
  ${SESSION_JOIN}
  LEFT JOIN tank_forecasts f ON f.asset_id = a.id AND a.kind = 'tank'
  LEFT JOIN fl ON fl.asset_id = a.id
  WHERE a.organisation_id = $1 AND ${siteScope(scope, "a.site_id")} ${where}
  ORDER BY a.name, a.id`;
}

export interface Occupancy {
  occupied: boolean;
  /** When the bay entered its present state; null when no session was ever seen. */
  since: string | null;
}

function occupancyOf(r: AssetStateRow): Occupancy | null {
  if (r.kind !== "bay") return null;
  if (r.session_started_at && !r.session_ended_at) return { occupied: true, since: iso(r.session_started_at) };
  if (r.session_ended_at) return { occupied: false, since: iso(r.session_ended_at) };
  // Before the first session the latest measurement tells the state, without a start.
  return r.occupied == null ? null : { occupied: r.occupied, since: null };
}

function iso(d: Date | string | null): string | null {
  return d == null ? null : new Date(d).toISOString();
}

export function serialiseAssetState(r: AssetStateRow, now = new Date()) {
  return {
    id: r.id,
    site_id: r.site_id,
    kind: r.kind,
    purpose: r.purpose,
    name: r.name,
    capacity_l: r.capacity_l,
    safe_fill_pct: r.safe_fill_pct,
    reorder_pct: r.reorder_pct,
    mount_height_m: r.mount_height_m,
    tank_height_m: r.geometry ? tankHeight(r.geometry) : null,
    floor_distance_m: r.floor_distance_m,
    occupied_below_m: r.occupied_below_m,
    bay: r.kind === "bay" ? { row: r.bay_row, col: r.bay_col, level: r.bay_level } : null,
    channel: r.channel_id
      ? { id: r.channel_id, device_id: r.device_id as string, device_name: r.device_name as string, expected_interval_s: r.expected_interval_s as number, last_seen_at: iso(r.last_seen_at) }
      : null,
    latest: r.value_at
      ? { at: iso(r.value_at) as string, level_m: r.level_m, distance_m: r.distance_m, volume_l: r.volume_l, fill_pct: r.fill_pct, uncertainty_m: r.uncertainty_m, occupied: r.occupied }
      : null,
    occupancy: occupancyOf(r),
    /** A tank's plan verdict (lib/read-models/forecasts.ts), null for other assets. */
    plan: tankPlanOf({
      kind: r.kind,
      purpose: r.purpose,
      forecast: r.forecast,
      latest: r.value_at ? { at: r.value_at, volume_l: r.volume_l } : null,
      flags: r.flags ?? [],
      expectedIntervalS: r.expected_interval_s,
      now,
    }),
    flags: r.flags ?? [],
  };
}
export type AssetStateJson = ReturnType<typeof serialiseAssetState>;

/** Live state of the organisation's assets, optionally of one site or one asset, by name. */
export async function listAssetStates(scope: Scope, filter: { siteId?: string; assetId?: string } = {}, now = new Date()): Promise<AssetStateJson[]> {
  const params = [scope.organisationId, ...(filter.siteId ? [filter.siteId] : []), ...(filter.assetId ? [filter.assetId] : [])];
  const rows = await sqlRows<AssetStateRow>(assetStateSql(scope, filter), params, { name: "asset_states" });
  return rows.map((r) => serialiseAssetState(r, now));
}

interface DeviceSeenRow {
  id: string;
  site_id: string;
  last_seen_at: Date | null;
  expected_interval_s: number;
}

/** Devices and how many are offline (no reading for 3 expected intervals, lib/health/flags) per site. */
export async function deviceCountsBySite(scope: Scope, now = new Date(), siteId?: string): Promise<Map<string, { total: number; offline: number }>> {
  const { organisationId } = scope;
  const rows = await sqlRows<DeviceSeenRow>(
    `SELECT id, site_id, last_seen_at, expected_interval_s FROM devices WHERE organisation_id = $1 AND ${siteScope(scope, "site_id")} ${siteId ? "AND site_id = $2" : ""}`,
    siteId ? [organisationId, siteId] : [organisationId],
    { name: "devices_seen" },
  );
  const counts = new Map<string, { total: number; offline: number }>();
  for (const d of rows) {
    const c = counts.get(d.site_id) ?? { total: 0, offline: 0 };
    c.total += 1;
    if (detectOffline(d.last_seen_at, d.expected_interval_s, now)) c.offline += 1;
    counts.set(d.site_id, c);
  }
  return counts;
}

/** How many tanks a site shows at a glance; a site with more shows the emptiest ones. */
export const TANKS_AT_A_GLANCE = 12;

interface FleetTankRow {
  id: string;
  site_id: string;
  name: string;
  purpose: TankPurpose | null;
  capacity_l: number | null;
  reorder_pct: number | null;
  expected_interval_s: number | null;
  value_at: Date | null;
  level_m: number | null;
  uncertainty_m: number | null;
  fill_pct: number | null;
  volume_l: number | null;
  forecast: StoredForecastJson | null;
  flags: string[] | null;
  flagged_since: Date | null;
  site_tanks: string;
}

// Tanks by site: all of them where a site has at most TANKS_AT_A_GLANCE (by name), else the emptiest.
const fleetTanksSql = (scope: Scope) => `
  WITH ${channelCte(scope)},
  tf AS (
    SELECT hc.asset_id, array_agg(DISTINCT h.flag ORDER BY h.flag) AS flags, min(h.since) AS flagged_since
    FROM health_flags h JOIN channels hc ON hc.id = h.channel_id JOIN devices hd ON hd.id = hc.device_id
    WHERE h.cleared_at IS NULL AND hd.organisation_id = $1 AND ${siteScope(scope, "hd.site_id")} AND hc.asset_id IS NOT NULL
    GROUP BY hc.asset_id
  ),
  t AS (
    SELECT a.id, a.site_id, a.name, a.purpose, a.capacity_l, a.reorder_pct, ch.expected_interval_s, ${LATEST_COLUMNS}, ${FORECAST_JSON} AS forecast, tf.flags, tf.flagged_since
    FROM assets a
    LEFT JOIN ch ON ch.asset_id = a.id
    LEFT JOIN tank_forecasts f ON f.asset_id = a.id
    LEFT JOIN tf ON tf.asset_id = a.id
    WHERE a.organisation_id = $1 AND ${siteScope(scope, "a.site_id")} AND a.kind = 'tank'
  ), ranked AS (
    SELECT t.*, count(*) OVER (PARTITION BY site_id) AS site_tanks,
           row_number() OVER (PARTITION BY site_id ORDER BY fill_pct ASC NULLS FIRST, name, id) AS fill_rank
    FROM t
  )
  SELECT * FROM ranked WHERE site_tanks <= ${TANKS_AT_A_GLANCE} OR fill_rank <= ${TANKS_AT_A_GLANCE}
  ORDER BY site_id, CASE WHEN site_tanks <= ${TANKS_AT_A_GLANCE} THEN 0 ELSE fill_rank END, name, id`;

// Bays occupied, free and with a sensor fault, and points with a fault, per site. A bay's state is its
// latest session's; before its first session, its latest valid measurement's (as listAssetStates).
const fleetCountsSql = (scope: Scope) => `
  WITH ${channelCte(scope)},
  flagged AS (
    SELECT DISTINCT hc.asset_id FROM health_flags h JOIN channels hc ON hc.id = h.channel_id JOIN devices hd ON hd.id = hc.device_id
    WHERE h.cleared_at IS NULL AND hd.organisation_id = $1 AND ${siteScope(scope, "hd.site_id")}
  )
  SELECT a.site_id, a.kind, count(*) AS total,
         count(*) FILTER (WHERE fg.asset_id IS NOT NULL) AS faulty,
         count(*) FILTER (WHERE fg.asset_id IS NULL AND occ.occupied) AS occupied,
         count(*) FILTER (WHERE fg.asset_id IS NULL AND NOT occ.occupied) AS free
  FROM assets a
  LEFT JOIN ch ON ch.asset_id = a.id
  LEFT JOIN flagged fg ON fg.asset_id = a.id
  ${SESSION_JOIN}
  CROSS JOIN LATERAL (SELECT CASE WHEN os.started_at IS NOT NULL THEN os.ended_at IS NULL ELSE ch.occupied END AS occupied) occ
  WHERE a.organisation_id = $1 AND ${siteScope(scope, "a.site_id")} AND a.kind IN ('bay', 'point')
  GROUP BY a.site_id, a.kind`;

interface FleetCountRow {
  site_id: string;
  kind: "bay" | "point";
  total: string;
  faulty: string;
  occupied: string;
  free: string;
}

const NO_ALARMS: PriorityCounts = { critical: 0, high: 0, medium: 0, low: 0 };

/**
 * Every site of the organisation with its tanks (at most TANKS_AT_A_GLANCE each, the emptiest first
 * where there are more), its bays occupied and free, its alarms needing attention by priority and its
 * devices offline. Counted and ranked in the database, so the answer stays small for a large fleet.
 */
export async function fleetOverview(scope: Scope, now = new Date()) {
  const { organisationId } = scope;
  const [sites, tanks, counts, devices, alarms] = await Promise.all([
    sqlRows<{ id: string; name: string; time_zone: string }>(
      `SELECT id, name, time_zone FROM sites WHERE organisation_id = $1 AND ${siteScope(scope, "id")} ORDER BY name, id`,
      [organisationId],
      { name: "fleet_sites" },
    ),
    sqlRows<FleetTankRow>(fleetTanksSql(scope), [organisationId], { name: "fleet_tanks" }),
    sqlRows<FleetCountRow>(fleetCountsSql(scope), [organisationId], { name: "fleet_counts" }),
    deviceCountsBySite(scope, now),
    activeAlarmsBySite(scope),
  ]);
  const tanksBySite = new Map<string, FleetTankRow[]>();
  for (const t of tanks) tanksBySite.set(t.site_id, [...(tanksBySite.get(t.site_id) ?? []), t]);
  const countOf = (siteId: string, kind: "bay" | "point") => counts.find((c) => c.site_id === siteId && c.kind === kind);
  const items = sites.map((s) => {
    const here = tanksBySite.get(s.id) ?? [];
    const bays = countOf(s.id, "bay");
    const points = countOf(s.id, "point");
    const bay = { total: Number(bays?.total ?? 0), occupied: Number(bays?.occupied ?? 0), free: Number(bays?.free ?? 0), faulty: Number(bays?.faulty ?? 0) };
    return {
      id: s.id,
      name: s.name,
      time_zone: s.time_zone,
      tank_count: here.length ? Number(here[0].site_tanks) : 0,
      tanks: here.map((t) => ({
        id: t.id,
        name: t.name,
        capacity_l: t.capacity_l,
        reorder_pct: t.reorder_pct,
        level_m: t.level_m,
        uncertainty_m: t.uncertainty_m,
        fill_pct: t.fill_pct,
        volume_l: t.volume_l,
        at: iso(t.value_at),
        expected_interval_s: t.expected_interval_s,
        plan: tankPlanOf({
          kind: "tank",
          purpose: t.purpose,
          forecast: t.forecast,
          latest: t.value_at ? { at: t.value_at, volume_l: t.volume_l } : null,
          flags: (t.flags ?? []).map((flag) => ({ flag, since: t.flagged_since })),
          expectedIntervalS: t.expected_interval_s,
          now,
        }),
        flags: t.flags ?? [],
      })),
      bays: { ...bay, unknown: bay.total - bay.occupied - bay.free - bay.faulty },
      points: { total: Number(points?.total ?? 0), faulty: Number(points?.faulty ?? 0) },
      alarms: alarms.get(s.id) ?? NO_ALARMS,
      devices: devices.get(s.id) ?? { total: 0, offline: 0 },
    };
  });
  const sum = (pick: (s: (typeof items)[number]) => number) => items.reduce((n, s) => n + pick(s), 0);
  return {
    generated_at: now.toISOString(),
    tanks_at_a_glance: TANKS_AT_A_GLANCE,
    totals: {
      sites: items.length,
      tanks: sum((s) => s.tank_count),
      bays: sum((s) => s.bays.total),
      bays_occupied: sum((s) => s.bays.occupied),
      devices: sum((s) => s.devices.total),
      devices_offline: sum((s) => s.devices.offline),
      alarms: {
        critical: sum((s) => s.alarms.critical),
        high: sum((s) => s.alarms.high),
        medium: sum((s) => s.alarms.medium),
        low: sum((s) => s.alarms.low),
      },
    },
    sites: items,
  };
}
export type FleetOverviewJson = Awaited<ReturnType<typeof fleetOverview>>;
