// Alarm-system health for a period: every activation from the alarm events (with when its condition
// cleared), measured by lib/alarms/alarm-health.ts against the ISA-18.2 / EEMUA 191 benchmarks.

import { siteScope, type Scope } from "../db/site-scope";
import { computeAlarmHealth, type AlarmActivation } from "../alarms/alarm-health";
import { alarmKindLabel, type AlarmKind } from "../alarms/engine";
import type { AlarmPriority } from "../alarms/state-machine";
import { sqlRows } from "../db/sql";

const DAY_MS = 86_400_000;
/** The benchmarks are stated over 30 days or more (REFERENCES.md §4), so that is the default period. */
export const DEFAULT_HEALTH_DAYS = 30;

export async function alarmHealth(scope: Scope, q: { from?: Date; to?: Date; site_id?: string }, now = new Date()) {
  const { organisationId } = scope;
  const to = q.to ?? now;
  const from = q.from ?? new Date(to.getTime() - DEFAULT_HEALTH_DAYS * DAY_MS);
  const found = await sqlRows<{ alarm_id: string; at: Date; priority: AlarmPriority; active_until: Date | null }>(
    `SELECT e.alarm_id, e.at, COALESCE(e.priority, al.priority) AS priority, c.at AS active_until
     FROM alarm_events e JOIN alarms al ON al.id = e.alarm_id
     LEFT JOIN LATERAL (
       SELECT e2.at FROM alarm_events e2
       WHERE e2.alarm_id = e.alarm_id AND e2.kind IN ('returned_to_normal', 'cleared_while_latched', 'condition_cleared_logged')
         AND (e2.at, e2.id) > (e.at, e.id)
       ORDER BY e2.at, e2.id LIMIT 1
     ) c ON true
     WHERE al.organisation_id = :organisationId AND ${siteScope(scope, "al.site_id")} AND e.kind IN ('activated', 're_alarmed')
       AND e.at < :to AND e.at >= CAST(:from AS timestamptz) - interval '30 days'
       ${q.site_id ? "AND al.site_id = :siteId" : ""}
       AND (e.at >= :from OR c.at IS NULL OR c.at > :from)`,
    { organisationId, from, to, siteId: q.site_id },
  );
  const activations: AlarmActivation[] = found.map((r) => ({ alarmKey: r.alarm_id, at: r.at, priority: r.priority, activeUntil: r.active_until }));
  const report = computeAlarmHealth(activations, { from, to });
  const keys = [...new Set([...report.top10, ...report.chattering, ...report.stale].map((a) => a.alarmKey))];
  const labels = keys.length
    ? await sqlRows<{ id: string; kind: AlarmKind; site_name: string; asset_name: string | null; channel_index: number | null; device_name: string | null }>(
        `SELECT al.id, al.kind, s.name AS site_name, a.name AS asset_name, ch.index AS channel_index, d.name AS device_name
         FROM alarms al JOIN sites s ON s.id = al.site_id LEFT JOIN assets a ON a.id = al.asset_id
         LEFT JOIN channels ch ON ch.id = al.channel_id LEFT JOIN devices d ON d.id = ch.device_id
         WHERE al.id IN (:keys) AND al.organisation_id = :organisationId AND ${siteScope(scope, "al.site_id")}`,
        { keys, organisationId },
      )
    : [];
  const alarmLabels = Object.fromEntries(
    labels.map((l) => [
      l.id,
      [l.site_name, l.asset_name ?? (l.device_name ? `${l.device_name} ch ${l.channel_index}` : null), alarmKindLabel(l.kind)].filter(Boolean).join(" › "),
    ]),
  );
  return { ...report, site_id: q.site_id ?? null, alarm_labels: alarmLabels };
}
export type AlarmHealthJson = Awaited<ReturnType<typeof alarmHealth>>;
