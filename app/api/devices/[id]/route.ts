import { actorOf, requirePermission } from "@/lib/auth/session";
import { describeDeviceTiming, findDevice, listDeviceKeys, serialiseDevice, updateDevice } from "@/lib/services/devices";
import { parseJsonBody } from "@/lib/http/errors";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { updateDeviceSchema } from "@/lib/validations/device";

export const GET = route<IdContext>(async (_req, ctx) => {
  const user = await requirePermission("dashboard:read");
  const { device, channels } = await findDevice(user.scope, await idParam(ctx, "That device"));
  const json = serialiseDevice(device, channels);
  return Response.json({ ...json, keys: await listDeviceKeys(device.id), timing: await describeDeviceTiming(json) });
});

export const PATCH = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("device:manage");
  const id = await idParam(ctx, "That device");
  const patch = await parseJsonBody(req, updateDeviceSchema);
  return Response.json(await updateDevice(actorOf(user), id, patch));
});
