import { actorOf, requirePermission } from "@/lib/auth/session";
import { actOnAlarm } from "@/lib/services/alarms";
import { HttpError } from "@/lib/http/errors";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { shelveExpiry, shelveSchema } from "@/lib/validations/alarm";
import { actionBody } from "../../action-body";

// Body: { reason, duration_min | until, comment? }; at most 24 h, and the alarm returns by itself.
export const POST = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("alarm:shelve");
  const id = await idParam(ctx, "That alarm");
  const input = await actionBody(req, shelveSchema);
  const expiry = shelveExpiry(input, new Date());
  if ("message" in expiry) throw new HttpError(422, "invalid", `${expiry.path}: ${expiry.message}`, {}, { fields: { [expiry.path]: expiry.message } });
  return Response.json(await actOnAlarm(actorOf(user), id, { type: "shelve", until: expiry.until, reason: input.reason, comment: input.comment }));
});
