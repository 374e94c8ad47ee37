import { actorOf, requirePermission } from "@/lib/auth/session";
import { findSite, serialiseSite, updateSite } from "@/lib/services/sites";
import { parseJsonBody } from "@/lib/http/errors";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { updateSiteSchema } from "@/lib/validations/site";

export const GET = route<IdContext>(async (_req, ctx) => {
  const user = await requirePermission("dashboard:read");
  return Response.json(serialiseSite(await findSite(user.scope, await idParam(ctx, "That site"))));
});

export const PATCH = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("site:manage");
  const id = await idParam(ctx, "That site");
  const patch = await parseJsonBody(req, updateSiteSchema);
  return Response.json(await updateSite(actorOf(user), id, patch));
});
