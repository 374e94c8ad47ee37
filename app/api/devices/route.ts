import { actorOf, requirePermission } from "@/lib/auth/session";
import { createDevice, listDevices } from "@/lib/services/devices";
import { parseJsonBody, parseQuery } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { createDeviceSchema, deviceListQuerySchema } from "@/lib/validations/device";

export const GET = route(async (req) => {
  const user = await requirePermission("dashboard:read");
  return Response.json({ items: await listDevices(user.scope, parseQuery(req.url, deviceListQuerySchema)) });
});

export const POST = route(async (req) => {
  const user = await requirePermission("device:manage");
  const input = await parseJsonBody(req, createDeviceSchema);
  const { device, api_key } = await createDevice(actorOf(user), input);
  return Response.json({ ...device, api_key }, { status: 201, headers: { "Cache-Control": "no-store" } });
});
