import type { Actor } from "../../lib/db/audit";
import { tankHeight, type TankGeometry } from "../../lib/geometry/tank-volume";
import { initModels, User } from "../../lib/db/models";
import { rows } from "../../lib/db/queries/alarms-store";
import { putOnCall } from "../../lib/db/queries/on-call";
import { putSetpoints } from "../../lib/db/queries/alarms-setpoints";
import { putSetpointsSchema } from "../../lib/validations/setpoint";
import { DEMO_ON_CALL } from "./demo-accounts";
import { DEMO_TANKS } from "./demo-plan";

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
  initModels();
  const actor: Actor = { organisationId, userId: null, label: "seed" };
  const tanks = await rows<TankRow>(
    `SELECT a.id, a.name, a.safe_fill_pct, a.reorder_pct, a.geometry FROM assets a
     WHERE a.organisation_id = :organisationId AND a.kind = 'tank' AND a.geometry IS NOT NULL
       AND NOT EXISTS (SELECT 1 FROM alarm_setpoints sp WHERE sp.asset_id = a.id)
     ORDER BY a.name`,
    { organisationId },
  );
  for (const t of tanks) await putSetpoints(actor, t.id, demoSetpoints(t, tankHeight(t.geometry)));
  const people = await User.findAll({ where: { organisation_id: organisationId, email: DEMO_ON_CALL, status: "active" } });
  const ordered = DEMO_ON_CALL.map((email) => people.find((u) => u.email === email)?.id).filter((id): id is string => !!id);
  const sites = await rows<{ id: string }>(
    `SELECT s.id FROM sites s WHERE s.organisation_id = :organisationId AND NOT EXISTS (SELECT 1 FROM on_call_entries oc WHERE oc.site_id = s.id) ORDER BY s.name`,
    { organisationId },
  );
  if (ordered.length) for (const s of sites) await putOnCall(actor, s.id, { user_ids: ordered });
  return { tanks: tanks.length, sites: ordered.length ? sites.length : 0 };
}
