import { requirePermission } from "@/lib/auth/session";
import { fleetOverview } from "@/lib/read-models/overview";
import { route } from "@/lib/http/route";

// The fleet overview: every site of the signed-in user's organisation with its assets' live state.
export const GET = route(async () => {
  const user = await requirePermission("dashboard:read");
  return Response.json(await fleetOverview(user.scope));
});
