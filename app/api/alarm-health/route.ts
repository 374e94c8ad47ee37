import { requirePermission } from "@/lib/auth/session";
import { alarmHealth } from "@/lib/read-models/alarm-health";
import { parseQuery } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { alarmHealthQuerySchema } from "@/lib/validations/alarm";

// GET /api/alarm-health?from=&to=&site_id= (default: the last 30 days, the benchmarks' minimum period)
export const GET = route(async (req) => {
  const user = await requirePermission("dashboard:read");
  return Response.json(await alarmHealth(user.scope, parseQuery(req.url, alarmHealthQuerySchema)));
});
