import { requirePermission } from "@/lib/auth/session";
import { refillPlan } from "@/lib/read-models/refill-plan";
import { parseQuery } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { uuidSchema } from "@/lib/validations/common";
import { refillPlanQuery } from "@/lib/validations/export";

const query = refillPlanQuery.extend({ site_id: uuidSchema.optional() });

/** Deliveries, pump-outs and top-ups due within the horizon, tanks that need a check, and tanks not forecast yet. */
export const GET = route(async (req) => {
  const user = await requirePermission("dashboard:read");
  const q = parseQuery(req.url, query);
  return Response.json(await refillPlan(user.scope, { horizonDays: q.horizon_days, siteId: q.site_id }));
});
