import { requirePermission } from "@/lib/auth/session";
import { channelHealth } from "@/lib/read-models/measurements";
import { parseQuery } from "@/lib/http/errors";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { healthQuerySchema } from "@/lib/validations/measurement";

export const GET = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("dashboard:read");
  const id = await idParam(ctx, "That channel");
  return Response.json(await channelHealth(user.scope, id, parseQuery(req.url, healthQuerySchema)));
});
