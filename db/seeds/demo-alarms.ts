import type { Actor } from "../../lib/services/audit";
import { tankHeight, type TankGeometry } from "../../lib/geometry/tank-volume";
import { User } from "../../lib/db/models";
import { putOnCall } from "../../lib/services/on-call";
import { putSetpoints } from "../../lib/services/alarm-setpoints";
import { putSetpointsSchema } from "../../lib/validations/setpoint";
import { DEMO_TANKS } from "./demo-plan";
import { sqlRows } from "../../lib/db/sql";

// Demo scenario only: alarm setpoints for every demo tank and an on-call list for every demo site, so
// the simulated fleet raises alarms of its own and their e-mails reach the demo technician, then the
// operator. Setpoints are demo choices in fill % of capacity, placed so that each simulated draw-down
// and refill (db/seeds/demo-plan.ts) crosses H and L: H 5 points below the refill's top, L 5 points
// above where it refills, HH at the safe fill and LL at half the refill point; a leak alarm for a fall
// of a tenth of the tank height in an hour. A tank not in the plan gets H 5 points below its safe
// fill and L at its reorder level.
export const DEMO_ON_CALL = ["technician@halftrip.test", "operator@halftrip.test"];

interface TankRow {
  id: string;
  name: string;
  safe_fill_pct: number | null;
  reorder_pct: number | null;
  geometry: TankGeometry;
}

function demoSetpoints(t: TankRow, heightM: number) {
  const safe = t.safe_fill_pct ?? 90;
  const usage = DEMO_TANKS.find((d) => d.name === t.name)?.usage;
  const top = usage ? usage.refill_to_pct : safe;
  const bottom = usage ? usage.refill_below_pct + 5 : (t.reorder_pct ?? 25);
  return putSetpointsSchema.parse({
    unit: "pct",
    setpoints: {
      hh: { value: safe, priority: "high" },
      h: { value: top - 5, priority: "medium" },
      l: { value: bottom, priority: "low" },
      ll: { value: (usage ? usage.refill_below_pct : bottom) / 2, priority: "high" },
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
