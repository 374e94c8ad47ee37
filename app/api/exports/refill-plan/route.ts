import { requirePermission } from "@/lib/auth/session";
import { refillPlanBatches, refillPlanColumns } from "@/lib/services/exports";
import { exportUnitsOf } from "@/lib/services/display-settings";
import { attachmentName, csvStream } from "@/lib/csv/write";
import { parseQuery } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { uuidSchema } from "@/lib/validations/common";
import { refillPlanQuery } from "@/lib/validations/export";
import { csvResponse } from "../csv-response";

const query = refillPlanQuery.extend({ site_id: uuidSchema.optional() });

/** The refill plan for a horizon, as CSV (what a delivery partner plans from). */
export const GET = route(async (req) => {
  const user = await requirePermission("export:read");
  const q = parseQuery(req.url, query);
  const name = attachmentName(`refill-plan-${q.horizon_days}-days-${new Date().toISOString().slice(0, 10)}`);
  const units = await exportUnitsOf(user, q.units);
  return csvResponse(csvStream(refillPlanColumns(units), refillPlanBatches(user.scope, { horizonDays: q.horizon_days, siteId: q.site_id, units })), name);
});
