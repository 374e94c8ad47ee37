import { z } from "zod";
import { requirePermission } from "@/lib/auth/session";
import { assetUncertaintyBudget } from "@/lib/read-models/uncertainty-budget";
import { parseQuery } from "@/lib/http/errors";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { uuidSchema } from "@/lib/validations/common";

const query = z.object({ channel_id: uuidSchema.optional() });

/** The uncertainty budget of the asset's latest distance, part by part (GUM), for its first channel unless one is named. */
export const GET = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("dashboard:read");
  const id = await idParam(ctx, "That asset");
  const { channel_id } = parseQuery(req.url, query);
  return Response.json(await assetUncertaintyBudget(user.scope, id, channel_id ?? null));
});
