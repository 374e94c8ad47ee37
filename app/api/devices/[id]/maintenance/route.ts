import { actorOf, requirePermission } from "@/lib/auth/session";
import { parseJsonBody } from "@/lib/http/errors";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { startMaintenance } from "@/lib/services/maintenance-windows";
import { maintenanceSchema } from "@/lib/validations/alarm";

// Body: { mode: "shelve" | "out_of_service", reason, until }: every alarm of the device until then.
export const POST = route<IdContext>(async (req, ctx) => {
  let user = await requirePermission("alarm:shelve");
  const input = await parseJsonBody(req, maintenanceSchema);
  if (input.mode === "out_of_service") user = await requirePermission("alarm:out_of_service");
  const id = await idParam(ctx, "That device");
  return Response.json(await startMaintenance(actorOf(user), { kind: "device", id }, input), { status: 201 });
});
