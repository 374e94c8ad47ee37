import { requirePermission } from "@/lib/auth/session";
import { siteOverview } from "@/lib/read-models/overview-site";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";

// A site's live screen: tanks with the last day, bays as they stand, alarms needing attention.
export const GET = route<IdContext>(async (_req, ctx) => {
  const user = await requirePermission("dashboard:read");
  return Response.json(await siteOverview(user.scope, await idParam(ctx, "That site")));
});
