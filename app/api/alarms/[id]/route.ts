import { requirePermission } from "@/lib/auth/session";
import { findAlarmWithHistory } from "@/lib/services/alarms";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";

export const GET = route<IdContext>(async (_req, ctx) => {
  const user = await requirePermission("dashboard:read");
  return Response.json(await findAlarmWithHistory(user.scope, await idParam(ctx, "That alarm")));
});
