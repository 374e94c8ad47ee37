import { actorOf, requirePermission } from "@/lib/auth/session";
import { actOnAlarm } from "@/lib/services/alarms";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { plainActionSchema } from "@/lib/validations/alarm";
import { actionBody } from "../../action-body";

export const POST = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("alarm:shelve");
  const id = await idParam(ctx, "That alarm");
  const { comment } = await actionBody(req, plainActionSchema);
  return Response.json(await actOnAlarm(actorOf(user), id, { type: "unshelve", comment }));
});
