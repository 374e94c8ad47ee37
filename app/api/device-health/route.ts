import { requirePermission } from "@/lib/auth/session";
import { listDeviceHealth } from "@/lib/read-models/overview-devices";
import { parseQuery } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { deviceHealthQuerySchema } from "@/lib/validations/overview";

// The devices health table, paged, sorted and filtered on the server.
export const GET = route(async (req) => {
  const user = await requirePermission("dashboard:read");
  return Response.json(await listDeviceHealth(user.scope, parseQuery(req.url, deviceHealthQuerySchema)));
});
