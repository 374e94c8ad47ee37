import { requirePermission } from "@/lib/auth/session";
import { route } from "@/lib/http/route";
import { fetchCaughtMessages, isMailSinkConfigured } from "@/lib/mail/sink-client";

export const GET = route(async () => {
  await requirePermission("mail:read");
  return Response.json({ configured: isMailSinkConfigured(), items: await fetchCaughtMessages() });
});
