import { actorOf, requirePermission } from "@/lib/auth/session";
import { getSetpoints, putSetpoints } from "@/lib/services/alarm-setpoints";
import { parseJsonBody } from "@/lib/http/errors";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { putSetpointsSchema } from "@/lib/validations/setpoint";

export const GET = route<IdContext>(async (_req, ctx) => {
  const user = await requirePermission("dashboard:read");
  return Response.json(await getSetpoints(user.scope, await idParam(ctx, "That asset")));
});

// The whole set at once: a setpoint left out (or null) is removed.
export const PUT = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("setpoint:edit");
  const id = await idParam(ctx, "That asset");
  const input = await parseJsonBody(req, putSetpointsSchema);
  return Response.json(await putSetpoints(actorOf(user), id, input));
});
