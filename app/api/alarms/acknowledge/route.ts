import { actorOf, requirePermission } from "@/lib/auth/session";
import { acknowledgeAlarms } from "@/lib/services/alarms";
import { parseJsonBody } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { bulkAcknowledgeSchema } from "@/lib/validations/alarm";

// Bulk acknowledge: { ids, comment? } → the alarms acknowledged and, by id, those that could not be.
export const POST = route(async (req) => {
  const user = await requirePermission("alarm:acknowledge");
  const { ids, comment } = await parseJsonBody(req, bulkAcknowledgeSchema);
  return Response.json(await acknowledgeAlarms(actorOf(user), ids, comment));
});
