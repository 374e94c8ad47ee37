import { siteScope, type Scope } from "../db/site-scope";
import type { DeviceHealthQuery, DeviceHealthSort } from "../validations/overview";
import { sqlRows } from "../db/sql";

// The devices health table: every device with when it was last heard, its battery and signal, its
// firmware and the open health flags of each channel; paged, sorted and filtered in the database.

// PRODUCT.md: a device is offline after 3 expected intervals without a reading (lib/health/flags.ts
// detectOffline applies the same rule in the worker and the overview).
const OFFLINE_INTERVALS = 3;

// Every sort has a unique tie-breaker so pages never overlap.
const ORDER: Record<DeviceHealthSort, string> = {
  name: "lower(name) {dir}, id",
  site: "lower(site_name) {dir}, lower(name), id",
  last_seen: "last_seen_at {dir} NULLS {nulls}, id",
  battery: "battery_v {dir} NULLS LAST, id",
  signal: "rssi_dbm {dir} NULLS LAST, id",
  firmware: "firmware {dir} NULLS LAST, lower(name), id",
  flags: "open_flags {dir}, lower(name), id",
};

interface DeviceRow {
  id: string;
  name: string;
  serial: string;
  site_id: string;
  site_name: string;
  profile: string;
  firmware: string | null;
  last_seen_at: Date | null;
  expected_interval_s: number;
  battery_v: number | null;
  rssi_dbm: number | null;
  offline: boolean;
  open_flags: string;
  total: string;
}

interface ChannelRow {
  id: string;
  device_id: string;
  index: number;
  asset_id: string | null;
  asset_name: string | null;
  asset_kind: string | null;
  last_at: Date | null;
  flags: { flag: string; since: string; magnitude: number | null }[] | null;
}

/** One page of the organisation's devices with their health, and the total that match the filters. */
export async function listDeviceHealth(scope: Scope, q: DeviceHealthQuery, now = new Date()) {
  const { organisationId } = scope;
  const filters: string[] = [siteScope(scope, "d.site_id")];
  if (q.site_id) filters.push("d.site_id = :siteId");
  if (q.q) filters.push("(d.name ILIKE :like OR d.serial ILIKE :like)");
  if (q.flag) filters.push("EXISTS (SELECT 1 FROM health_flags h JOIN channels c ON c.id = h.channel_id WHERE c.device_id = d.id AND h.cleared_at IS NULL AND h.flag = :flag)");
  const stateFilter = q.state === "offline" ? "WHERE offline" : q.state === "flagged" ? "WHERE open_flags > 0" : q.state === "healthy" ? "WHERE NOT offline AND open_flags = 0" : "";
  const dir = q.dir === "desc" ? "DESC" : "ASC";
  // Never seen sorts as the oldest.
  const order = ORDER[q.sort].replace("{dir}", dir).replace("{nulls}", dir === "ASC" ? "FIRST" : "LAST");
  const rows = await sqlRows<DeviceRow>(
    `WITH dev AS (
       SELECT d.id, d.name, d.serial, d.site_id, s.name AS site_name, d.profile, d.firmware, d.last_seen_at, d.expected_interval_s,
              d.battery_v, d.rssi_dbm,
              (d.last_seen_at IS NULL OR d.last_seen_at < :now::timestamptz - make_interval(secs => :intervals * d.expected_interval_s)) AS offline,
              (SELECT count(*) FROM health_flags h JOIN channels c ON c.id = h.channel_id WHERE c.device_id = d.id AND h.cleared_at IS NULL) AS open_flags
       FROM devices d JOIN sites s ON s.id = d.site_id
       WHERE d.organisation_id = :organisationId ${filters.map((f) => `AND ${f}`).join(" ")}
     )
     SELECT *, count(*) OVER () AS total FROM dev ${stateFilter}
     ORDER BY ${order}
     LIMIT :limit OFFSET :offset`,
    {
      organisationId,
      now,
      intervals: OFFLINE_INTERVALS,
      siteId: q.site_id,
      like: q.q ? `%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%` : undefined,
      flag: q.flag,
      limit: q.page_size,
      offset: (q.page - 1) * q.page_size,
    },
  );
  const ids = rows.map((r) => r.id);
  const channels = ids.length
    ? await sqlRows<ChannelRow>(
        `SELECT c.id, c.device_id, c.index, c.asset_id, a.name AS asset_name, a.kind AS asset_kind, cs.last_at,
                (SELECT json_agg(json_build_object('flag', h.flag, 'since', h.since, 'magnitude', h.magnitude) ORDER BY h.since)
                 FROM health_flags h WHERE h.channel_id = c.id AND h.cleared_at IS NULL) AS flags
         FROM channels c LEFT JOIN assets a ON a.id = c.asset_id LEFT JOIN channel_state cs ON cs.channel_id = c.id
         WHERE c.device_id IN (:ids)
         ORDER BY c.index`,
        { ids },
      )
    : [];
  const total = rows.length ? Number(rows[0].total) : await countWhenPastTheEnd(scope, q, now);
  return {
    total,
    page: q.page,
    page_size: q.page_size,
    sort: q.sort,
    dir: q.dir,
    generated_at: now.toISOString(),
    items: rows.map((r) => ({
      id: r.id,
      name: r.name,
      serial: r.serial,
      site_id: r.site_id,
      site_name: r.site_name,
      profile: r.profile,
      firmware: r.firmware,
      last_seen_at: r.last_seen_at ? new Date(r.last_seen_at).toISOString() : null,
      expected_interval_s: r.expected_interval_s,
      battery_v: r.battery_v,
      rssi_dbm: r.rssi_dbm,
      offline: r.offline,
      open_flags: Number(r.open_flags),
      channels: channels
        .filter((c) => c.device_id === r.id)
        .map((c) => ({
          id: c.id,
          index: c.index,
          asset_id: c.asset_id,
          asset_name: c.asset_name,
          asset_kind: c.asset_kind,
          last_at: c.last_at ? new Date(c.last_at).toISOString() : null,
          flags: c.flags ?? [],
        })),
    })),
  };
}
export type DeviceHealthPage = Awaited<ReturnType<typeof listDeviceHealth>>;
export type DeviceHealthRow = DeviceHealthPage["items"][number];

/** A page beyond the last has no rows to carry the window count; count the matches on their own. */
async function countWhenPastTheEnd(scope: Scope, q: DeviceHealthQuery, now: Date): Promise<number> {
  if (q.page === 1) return 0;
  const first = await listDeviceHealth(scope, { ...q, page: 1, page_size: 1 }, now);
  return first.total;
}
