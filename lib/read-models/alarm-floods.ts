// Whether the operator position (the organisation, or one site's alarms) is in an alarm flood now:
// the activations annunciated in the last hours, judged by lib/alarms/floods detectFlood (REFERENCES.md
// §4: more than 10 in 10 min, ending below ~5). Conditions logged while shelved, suppressed or out of
// service are not activations, so a silent device's suppressed channels do not flood the desk.

import { detectFlood, type FloodStatus } from "../alarms/floods";
import { sqlRows } from "../db/sql";

// A flood's start and end need the activations since the last quiet spell; a few hours is plenty.
const LOOKBACK_H = 6;

export async function alarmFloodStatus(organisationId: string, siteId: string | null = null, now = new Date()): Promise<FloodStatus> {
  const rows = await sqlRows<{ at: Date }>(
    `SELECT ev.at FROM alarm_events ev JOIN alarms al ON al.id = ev.alarm_id
     WHERE ev.organisation_id = :organisationId AND ev.kind IN ('activated', 're_alarmed')
       AND ev.at > :since AND ev.at <= :now AND (CAST(:siteId AS uuid) IS NULL OR al.site_id = CAST(:siteId AS uuid))`,
    { organisationId, siteId, since: new Date(now.getTime() - LOOKBACK_H * 3_600_000), now },
  );
  return detectFlood(rows.map((r) => r.at), now);
}
