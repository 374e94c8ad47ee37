import { requirePermission } from "@/lib/auth/session";
import { listAlarms } from "@/lib/services/alarms";
import { parseQuery } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { alarmListQuerySchema } from "@/lib/validations/alarm";

// GET /api/alarms?state=&site_id=&priority=&kind=&asset_id=&from=&to=&sort=&page=&page_size=
export const GET = route(async (req) => {
  const user = await requirePermission("dashboard:read");
  return Response.json(await listAlarms(user.scope, parseQuery(req.url, alarmListQuerySchema)));
});
