import { can } from "@/lib/auth/permissions";
import { actorOf, requirePermission } from "@/lib/auth/session";
import { getOnCall, putOnCall } from "@/lib/services/on-call";
import { parseJsonBody } from "@/lib/http/errors";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { putOnCallSchema } from "@/lib/validations/on-call";

export const GET = route<IdContext>(async (_req, ctx) => {
  const user = await requirePermission("dashboard:read");
  const withCandidates = can(user.role, "oncall:edit");
  return Response.json(await getOnCall(user.scope, await idParam(ctx, "That site"), { withCandidates }));
});

// { user_ids: [first, second, …] } replaces the ordered list.
export const PUT = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("oncall:edit");
  const id = await idParam(ctx, "That site");
  return Response.json(await putOnCall(actorOf(user), id, await parseJsonBody(req, putOnCallSchema)));
});
