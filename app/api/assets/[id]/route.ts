import { actorOf, requirePermission } from "@/lib/auth/session";
import { findAsset, serialiseAsset, updateAsset } from "@/lib/services/assets";
import { requestRecompute } from "@/lib/services/recompute-requests";
import { parseJsonBody } from "@/lib/http/errors";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { updateAssetSchema } from "@/lib/validations/asset";

export const GET = route<IdContext>(async (_req, ctx) => {
  const user = await requirePermission("dashboard:read");
  return Response.json(serialiseAsset(await findAsset(user.scope, await idParam(ctx, "That asset"))));
});

export const PATCH = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("asset:manage");
  const id = await idParam(ctx, "That asset");
  const patch = await parseJsonBody(req, updateAssetSchema);
  const { asset, shapeChanged } = await updateAsset(actorOf(user), id, patch);
  // The worker rebuilds the asset's measurements and rollups with the new shape in the background.
  if (shapeChanged) await requestRecompute({ assetId: id, reason: "asset geometry or mounting changed" });
  return Response.json(asset);
});
