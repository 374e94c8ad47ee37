import { actorOf, requirePermission } from "@/lib/auth/session";
import { createAsset, listAssets } from "@/lib/services/assets";
import { parseJsonBody, parseQuery } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { assetListQuerySchema, createAssetSchema } from "@/lib/validations/asset";

export const GET = route(async (req) => {
  const user = await requirePermission("dashboard:read");
  return Response.json({ items: await listAssets(user.scope, parseQuery(req.url, assetListQuerySchema)) });
});

export const POST = route(async (req) => {
  const user = await requirePermission("asset:manage");
  const input = await parseJsonBody(req, createAssetSchema);
  return Response.json(await createAsset(actorOf(user), input), { status: 201 });
});
