import { actorOf, requirePermission } from "@/lib/auth/session";
import { applyCalibration, channelCalibration } from "@/lib/services/calibration";
import { parseJsonBody } from "@/lib/http/errors";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { calibrationRequestSchema } from "@/lib/validations/calibration";

/** The channel's calibration now and its history of changes. */
export const GET = route<IdContext>(async (_req, ctx) => {
  const user = await requirePermission("dashboard:read");
  return Response.json(await channelCalibration(user.scope, await idParam(ctx, "That channel")));
});

/** Fits from the chosen dips and applies: the channel's calibration changes and its measurements are recomputed. */
export const POST = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("calibration:apply");
  const id = await idParam(ctx, "That channel");
  const request = await parseJsonBody(req, calibrationRequestSchema);
  return Response.json(await applyCalibration(actorOf(user), id, request), { status: 201 });
});
