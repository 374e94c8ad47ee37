import { requirePermission } from "@/lib/auth/session";
import { assetSeries } from "@/lib/read-models/measurements";
import { parseQuery } from "@/lib/http/errors";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { seriesQuerySchema } from "@/lib/validations/measurement";

export const GET = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("dashboard:read");
  const id = await idParam(ctx, "That asset");
  return Response.json(await assetSeries(user.scope, id, parseQuery(req.url, seriesQuerySchema)));
});
