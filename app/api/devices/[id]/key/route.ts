import { actorOf, requirePermission } from "@/lib/auth/session";
import { revokeDeviceKeys, rotateDeviceKey } from "@/lib/services/devices";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";

// POST rotates (a new key, shown once; every earlier key stops at once); DELETE revokes.
export const POST = route<IdContext>(async (_req, ctx) => {
  const user = await requirePermission("device:manage");
  const rotated = await rotateDeviceKey(actorOf(user), await idParam(ctx, "That device"));
  return Response.json(rotated, { status: 201, headers: { "Cache-Control": "no-store" } });
});

export const DELETE = route<IdContext>(async (_req, ctx) => {
  const user = await requirePermission("device:manage");
  return Response.json(await revokeDeviceKeys(actorOf(user), await idParam(ctx, "That device")));
});
