import { requirePermission } from "@/lib/auth/session";
import { previewCalibration } from "@/lib/services/calibration";
import { parseJsonBody } from "@/lib/http/errors";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { calibrationRequestSchema } from "@/lib/validations/calibration";

/** What a calibration from the chosen dips would be, and the trend as it is and as it would be; changes nothing. */
export const POST = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("calibration:apply");
  const id = await idParam(ctx, "That channel");
  const request = await parseJsonBody(req, calibrationRequestSchema);
  return Response.json(await previewCalibration(user.scope, id, request));
});
