import { actorOf, requirePermission } from "@/lib/auth/session";
import { voidDip } from "@/lib/services/dips";
import { parseJsonBody } from "@/lib/http/errors";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { voidDipSchema } from "@/lib/validations/dip";

/** Voids a wrong dip with a reason; it stays listed, and counts for nothing. */
export const POST = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("dip:record");
  const id = await idParam(ctx, "That dip");
  const input = await parseJsonBody(req, voidDipSchema);
  return Response.json(await voidDip(actorOf(user), id, input));
});
