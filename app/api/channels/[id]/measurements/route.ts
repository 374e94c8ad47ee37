import { requirePermission } from "@/lib/auth/session";
import { listChannelMeasurements } from "@/lib/read-models/measurements";
import { parseQuery } from "@/lib/http/errors";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { measurementsQuerySchema } from "@/lib/validations/measurement";

export const GET = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("dashboard:read");
  const id = await idParam(ctx, "That channel");
  return Response.json(await listChannelMeasurements(user.scope, id, parseQuery(req.url, measurementsQuerySchema)));
});
