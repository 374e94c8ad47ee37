import { requirePermission } from "@/lib/auth/session";
import { notFound } from "@/lib/errors";
import { route } from "@/lib/http/route";
import { organisationAddresses } from "@/lib/services/mail-sink";
import { fetchCaughtMessage, isMailSinkEnabled } from "@/lib/mail/sink-client";

export const GET = route<{ params: Promise<{ id: string }> }>(async (_req, { params }) => {
  const user = await requirePermission("mail:read");
  if (!isMailSinkEnabled()) throw notFound("The mail sink");
  // Mail to anyone outside the organisation answers 404, like an id of another organisation.
  const message = await fetchCaughtMessage((await params).id, await organisationAddresses(user));
  if (!message) throw notFound("That message");
  return Response.json(message);
});
