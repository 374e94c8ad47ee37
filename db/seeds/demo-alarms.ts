import type { Actor } from "../../lib/services/audit";
import { tankHeight, type TankGeometry } from "../../lib/geometry/tank-volume";
import { User } from "../../lib/db/models";
import { getSequelize } from "../../lib/db/sequelize";
import { ensureLevelAlarmRows } from "../../lib/worker/alarm-evaluation";
import { type AlarmDbRow, insertAlarmEvents, saveAlarm } from "../../lib/services/alarm-store";
import { putOnCall } from "../../lib/services/on-call";
import { putSetpoints } from "../../lib/services/alarm-setpoints";
import { putSetpointsSchema } from "../../lib/validations/setpoint";
import { DEMO_ON_CALL } from "./demo-accounts";
import { DEMO_TANKS } from "./demo-plan";
import { sqlRows } from "../../lib/db/sql";
import { demoTankHistory } from "./demo-team";
import type { SetpointDef } from "../../lib/alarms/setpoints";

// Demo scenario only: alarm setpoints for every demo tank and an on-call list for every demo site, so
// the simulated fleet raises alarms of its own and their e-mails reach the demo technician, then the
// operator. The setpoints are the plan's (db/seeds/demo-plan.ts), in fill % of capacity and outside each
// tank's normal operating band, so a normal day raises nothing and the alarms that do come are the
// scenario's planted problems (tests/unit/demo-alarm-plan.test.ts holds them to that); a leak alarm for
// a fall of a tenth of the tank height in an hour. A tank not in the plan gets H 5 points below its safe
// fill and L at its reorder level.

interface TankRow {
  id: string;
  name: string;
  safe_fill_pct: number | null;
  reorder_pct: number | null;
  geometry: TankGeometry;
}

function demoSetpoints(t: TankRow, heightM: number) {
  const safe = t.safe_fill_pct ?? 90;
  const sp = DEMO_TANKS.find((d) => d.name === t.name)?.setpoints_pct ?? { hh: safe, h: safe - 5, l: t.reorder_pct ?? 25, ll: (t.reorder_pct ?? 25) / 2 };
  return putSetpointsSchema.parse({
    unit: "pct",
    setpoints: {
      hh: { value: sp.hh, priority: "high" },
      h: { value: sp.h, priority: "medium" },
      l: { value: sp.l, priority: "low" },
      ll: { value: sp.ll, priority: "high" },
    },
    rate_of_change: { limit_m_per_h: Math.round(heightM * 100) / 1000, priority: "high" },
  });
}

/** Adds the demo alarm definitions to an organisation; tanks and sites that already have them are left alone. */
export async function seedDemoAlarms(organisationId: string): Promise<{ tanks: number; sites: number }> {
  const actor: Actor = { organisationId, userId: null, label: "seed" };
  const tanks = await sqlRows<TankRow>(
    `SELECT a.id, a.name, a.safe_fill_pct, a.reorder_pct, a.geometry FROM assets a
     WHERE a.organisation_id = :organisationId AND a.kind = 'tank' AND a.geometry IS NOT NULL
       AND NOT EXISTS (SELECT 1 FROM alarm_setpoints sp WHERE sp.asset_id = a.id)
     ORDER BY a.name`,
    { organisationId },
  );
  for (const t of tanks) await putSetpoints(actor, t.id, demoSetpoints(t, tankHeight(t.geometry)));
  const people = await User.findAll({ where: { organisation_id: organisationId, email: DEMO_ON_CALL, status: "active" } });
  const ordered = DEMO_ON_CALL.map((email) => people.find((u) => u.email === email)?.id).filter((id): id is string => !!id);
  const sites = await sqlRows<{ id: string }>(
    `SELECT s.id FROM sites s WHERE s.organisation_id = :organisationId AND NOT EXISTS (SELECT 1 FROM on_call_entries oc WHERE oc.site_id = s.id) ORDER BY s.name`,
    { organisationId },
  );
  if (ordered.length) for (const s of sites) await putOnCall(actor, s.id, { user_ids: ordered });
  return { tanks: tanks.length, sites: ordered.length ? sites.length : 0 };
}

/**
 * The 30 days before now of the demo tanks' level alarms, with the team's acknowledgements, shelves and
 * comments (db/seeds/demo-team.ts), written as the worker would have left them. Each alarm keeps the
 * evaluator's memory at now, so the worker judges only later readings and the simulator's backfill of
 * the same days raises nothing twice. Alarms that already have events are left alone.
 */
export async function seedDemoAlarmHistory(organisationId: string, now = new Date()): Promise<{ alarms: number; events: number }> {
  const tanks = await sqlRows<{ id: string; name: string; time_zone: string }>(
    `SELECT a.id, a.name, s.time_zone FROM assets a JOIN sites s ON s.id = a.site_id
     WHERE a.organisation_id = :organisationId AND a.kind = 'tank'
       AND NOT EXISTS (SELECT 1 FROM alarms al JOIN alarm_events ev ON ev.alarm_id = al.id WHERE al.asset_id = a.id)`,
    { organisationId },
  );
  const people = await User.findAll({ where: { organisation_id: organisationId, email: DEMO_ON_CALL } });
  const userOf = new Map(people.map((u) => [u.email, u.id]));
  let alarms = 0;
  let events = 0;
  await getSequelize().transaction(async (transaction) => {
    await ensureLevelAlarmRows(tanks.map((t) => t.id), transaction);
    for (const t of tanks) {
      const plan = DEMO_TANKS.find((d) => d.name === t.name);
      if (!plan) continue;
      const setpoints = await sqlRows<SetpointDef>(
        `SELECT key, value_m AS value, deadband_m AS deadband, on_delay_s AS "onDelayS", priority, enabled FROM alarm_setpoints WHERE asset_id = :assetId`,
        { assetId: t.id },
        { transaction },
      );
      const stored = await sqlRows<AlarmDbRow>(`SELECT * FROM alarms WHERE asset_id = :assetId AND channel_id IS NULL`, { assetId: t.id }, { transaction });
      for (const h of demoTankHistory(plan, setpoints, t.time_zone, now.getTime())) {
        const row = stored.find((r) => r.kind === h.key);
        if (!row) continue;
        const lastAt = h.evalState.lastAtMs === null ? null : new Date(h.evalState.lastAtMs);
        await saveAlarm(row.id, h.record, {
          evalState: h.evalState,
          evaluatedUntil: lastAt,
          acknowledged: h.acknowledged ? { at: new Date(h.acknowledged.atMs), userId: userOf.get(h.acknowledged.actor) ?? null } : null,
          shelveReason: h.record.snapshot.state === "shelved" ? ([...h.events].reverse().find((e) => e.kind === "shelved")?.cause ?? null) : null,
        }, transaction);
        await insertAlarmEvents(
          h.events.map((event) => ({ alarmId: row.id, organisationId, event, userId: userOf.get(event.actor) ?? null, actorLabel: event.actor, comment: event.comment })),
          transaction,
        );
        alarms++;
        events += h.events.length;
      }
    }
  });
  return { alarms, events };
}
