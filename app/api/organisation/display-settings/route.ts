import { actorOf, requirePermission } from "@/lib/auth/session";
import { parseJsonBody } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { organisationDisplaySettings, updateOrganisationDisplaySettings } from "@/lib/services/display-settings";
import { organisationDisplaySettingsSchema } from "@/lib/validations/display-settings";

/** The organisation's units, decimal separator and clock (what its people read; the APIs stay SI). */
export const GET = route(async () => {
  const user = await requirePermission("dashboard:read");
  return Response.json({ settings: await organisationDisplaySettings(user.organisationId) });
});

export const PATCH = route(async (req) => {
  const admin = await requirePermission("organisation:manage");
  const patch = await parseJsonBody(req, organisationDisplaySettingsSchema);
  return Response.json({ settings: await updateOrganisationDisplaySettings(actorOf(admin), patch) });
});
