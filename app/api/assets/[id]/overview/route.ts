import { requirePermission } from "@/lib/auth/session";
import { assetOverview } from "@/lib/read-models/overview-asset";
import { parseQuery } from "@/lib/http/errors";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { periodQuerySchema } from "@/lib/validations/overview";

// An asset's screen beside its trend: state, setpoints, flags, alarms, dips and calibrations in ?from=&to=.
export const GET = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("dashboard:read");
  const id = await idParam(ctx, "That asset");
  const period = parseQuery(req.url, periodQuerySchema);
  return Response.json(await assetOverview(user.scope, id, period));
});
