import { actorOf, requirePermission } from "@/lib/auth/session";
import { createSite, listSites } from "@/lib/services/sites";
import { parseJsonBody } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { createSiteSchema } from "@/lib/validations/site";

export const GET = route(async () => {
  const user = await requirePermission("dashboard:read");
  return Response.json({ items: await listSites(user.scope) });
});

export const POST = route(async (req) => {
  const user = await requirePermission("site:manage");
  const input = await parseJsonBody(req, createSiteSchema);
  return Response.json(await createSite(actorOf(user), input), { status: 201 });
});
