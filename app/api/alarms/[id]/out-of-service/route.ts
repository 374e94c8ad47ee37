import { actorOf, requirePermission } from "@/lib/auth/session";
import { actOnAlarm } from "@/lib/services/alarms";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { outOfServiceSchema } from "@/lib/validations/alarm";
import { actionBody } from "../../action-body";

export const POST = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("alarm:out_of_service");
  const id = await idParam(ctx, "That alarm");
  const { reason, comment } = await actionBody(req, outOfServiceSchema);
  return Response.json(await actOnAlarm(actorOf(user), id, { type: "remove_from_service", reason, comment }));
});
