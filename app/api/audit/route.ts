import { requirePermission } from "@/lib/auth/session";
import { listAuditEntries } from "@/lib/read-models/audit-log";
import { parseQuery } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { auditQuerySchema } from "@/lib/validations/audit";

export const GET = route(async (req) => {
  const user = await requirePermission("audit:read");
  return Response.json(await listAuditEntries(user.organisationId, parseQuery(req.url, auditQuerySchema)));
});
