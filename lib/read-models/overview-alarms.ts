import { personLabel, siteScope, textFor, type Scope } from "../db/site-scope";
import { alarmKindLabel, isAlarmKind } from "../alarms/engine";
import { listAlarms, type AlarmJson } from "../services/alarms";
import { sqlRows } from "../db/sql";

// What the live screens read from the alarm tables (db/migrations/0004-alarms.ts): counts of the
// alarms that need attention, those alarms for a site or an asset (the alarms list's own query), an
// asset's alarm history and its setpoints. Actions on alarms belong to the alarm routes.

/** The states in which an alarm asks for attention; shelved and out-of-service ones are hidden. */
export const ATTENTION_STATES = ["unacknowledged", "acknowledged", "returned_unacknowledged"] as const;

export interface PriorityCounts {
  critical: number;
  high: number;
  medium: number;
  low: number;
}

/** Alarms needing attention per site, by priority. */
export async function activeAlarmsBySite(scope: Scope, siteId?: string): Promise<Map<string, PriorityCounts>> {
  const { organisationId } = scope;
  const rows = await sqlRows<{ site_id: string; priority: keyof PriorityCounts; n: string }>(
    `SELECT site_id, priority, count(*) AS n FROM alarms
     WHERE organisation_id = $1 AND ${siteScope(scope, "site_id")} AND state = ANY($2) ${siteId ? "AND site_id = $3" : ""}
     GROUP BY site_id, priority`,
    [organisationId, ATTENTION_STATES, ...(siteId ? [siteId] : [])],
    { name: "alarm_counts" },
  );
  const out = new Map<string, PriorityCounts>();
  for (const r of rows) {
    const counts = out.get(r.site_id) ?? { critical: 0, high: 0, medium: 0, low: 0 };
    counts[r.priority] = Number(r.n);
    out.set(r.site_id, counts);
  }
  return out;
}

/** Alarms needing attention, most urgent first, of one site or one asset (through the alarms list). */
export async function listAttentionAlarms(scope: Scope, filter: { siteId?: string; assetId?: string }, limit = 100): Promise<AlarmJson[]> {
  const page = await listAlarms(scope, {
    state: [...ATTENTION_STATES],
    site_id: filter.siteId,
    asset_id: filter.assetId,
    sort: "priority",
    page: 1,
    page_size: limit,
  });
  return page.items;
}

interface AlarmEventRow {
  id: string;
  alarm_id: string;
  alarm_kind: string;
  at: Date;
  kind: string;
  from_state: string | null;
  to_state: string | null;
  cause: string;
  value: number | null;
  setpoint: number | null;
  priority: string | null;
  actor_label: string | null;
  actor_name: string | null;
  comment: string | null;
}

/** An asset's alarm events, newest first: every change of state of its level and health alarms. */
export async function listAssetAlarmHistory(scope: Scope, assetId: string, limit = 50) {
  const { organisationId } = scope;
  const rows = await sqlRows<AlarmEventRow>(
    `SELECT e.id, e.alarm_id, al.kind AS alarm_kind, e.at, e.kind, e.from_state, e.to_state, e.cause, e.value, e.setpoint,
            COALESCE(e.priority, al.priority) AS priority, e.actor_label, u.name AS actor_name, e.comment
     FROM alarm_events e JOIN alarms al ON al.id = e.alarm_id LEFT JOIN users u ON u.id = e.user_id
     WHERE al.organisation_id = :organisationId AND ${siteScope(scope, "al.site_id")} AND al.asset_id = :assetId
     ORDER BY e.at DESC, e.id DESC
     LIMIT :limit`,
    { organisationId, assetId, limit },
  );
  return rows.map(({ actor_name, ...r }) => ({ ...r, actor_label: personLabel(scope, r.actor_label, actor_name), cause: textFor(scope, r.cause), id: Number(r.id), at: new Date(r.at).toISOString(), alarm_label: isAlarmKind(r.alarm_kind) ? alarmKindLabel(r.alarm_kind) : r.alarm_kind }));
}

export interface SetpointJson {
  key: "hh" | "h" | "l" | "ll";
  value_m: number;
  priority: string;
  enabled: boolean;
}

/** Setpoints (metres of level) by asset id, of one asset or of every tank at a site. */
export async function setpointsByAsset(scope: Scope, of: { siteId?: string; assetId?: string }): Promise<Map<string, SetpointJson[]>> {
  const { organisationId } = scope;
  const out = new Map<string, SetpointJson[]>();
  if (!of.siteId && !of.assetId) return out;
  const rows = await sqlRows<SetpointJson & { asset_id: string }>(
    `SELECT sp.asset_id, sp.key, sp.value_m, sp.priority, sp.enabled
     FROM alarm_setpoints sp JOIN assets a ON a.id = sp.asset_id
     WHERE a.organisation_id = $1 AND ${siteScope(scope, "a.site_id")} AND a.kind = 'tank' ${of.siteId ? "AND a.site_id = $2" : ""} ${of.assetId ? `AND a.id = $${of.siteId ? 3 : 2}` : ""}
     ORDER BY sp.value_m DESC`,
    [organisationId, ...(of.siteId ? [of.siteId] : []), ...(of.assetId ? [of.assetId] : [])],
    { name: "setpoints" },
  );
  for (const { asset_id, ...sp } of rows) out.set(asset_id, [...(out.get(asset_id) ?? []), sp]);
  return out;
}
