import { requirePermission } from "@/lib/auth/session";
import { notFound } from "@/lib/errors";
import { route } from "@/lib/http/route";
import { fetchCaughtMessage } from "@/lib/mail/sink-client";

export const GET = route<{ params: Promise<{ id: string }> }>(async (_req, { params }) => {
  await requirePermission("mail:read");
  const message = await fetchCaughtMessage((await params).id);
  if (!message) throw notFound("That message");
  return Response.json(message);
});
