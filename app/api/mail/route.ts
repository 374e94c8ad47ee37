import { requirePermission } from "@/lib/auth/session";
import { notFound } from "@/lib/errors";
import { route } from "@/lib/http/route";
import { organisationAddresses } from "@/lib/services/mail-sink";
import { fetchCaughtMessages, isMailSinkEnabled } from "@/lib/mail/sink-client";

/** Mail the local sink caught for members of the admin's organisation; absent where there is no sink. */
export const GET = route(async () => {
  const user = await requirePermission("mail:read");
  if (!isMailSinkEnabled()) throw notFound("The mail sink");
  return Response.json({ configured: true, items: await fetchCaughtMessages(await organisationAddresses(user)) });
});
