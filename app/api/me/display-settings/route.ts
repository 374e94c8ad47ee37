import { actorOf, requirePermission } from "@/lib/auth/session";
import { parseJsonBody } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { displaySettingsOf, updateOwnDisplayPreferences } from "@/lib/services/display-settings";
import { displayPreferencesSchema } from "@/lib/validations/display-settings";

/** The signed-in user's display settings: the organisation's, their own (null follows it) and the effective ones. */
export const GET = route(async () => {
  const user = await requirePermission("dashboard:read");
  return Response.json(await displaySettingsOf(user.organisationId, user.id));
});

export const PATCH = route(async (req) => {
  const user = await requirePermission("dashboard:read");
  const patch = await parseJsonBody(req, displayPreferencesSchema);
  return Response.json(await updateOwnDisplayPreferences({ ...actorOf(user), userId: user.id }, patch));
});
