import { currentUser } from "@/lib/auth/session";
import { acknowledgeByLink, ackLinkProblemMessage } from "@/lib/services/notifications";
import { HttpError, parseJsonBody, PUBLIC_MAX_BODY_BYTES } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { ackLinkSchema } from "@/lib/validations/alarm";

const STATUS = { malformed: 404, bad_signature: 404, unknown: 404, expired: 410, used: 410, stale: 409, other_organisation: 403, recipient_unable: 403 } as const;

// Public by design: the signed, single-use link is the credential, and it acknowledges as its recipient.
// Someone signed in to another organisation is refused, so a link never acts across organisations.
export const POST = route(async (req) => {
  const { token, comment } = await parseJsonBody(req, ackLinkSchema, PUBLIC_MAX_BODY_BYTES);
  const viewer = await currentUser();
  const result = await acknowledgeByLink(token, comment ?? null, viewer?.organisationId ?? null);
  if (result.ok) return Response.json({ ok: true, alarm_id: result.alarmId, acknowledged_by: result.recipientEmail });
  if (result.reason === "not_acknowledgeable") throw new HttpError(409, "not_acknowledgeable", result.message);
  throw new HttpError(STATUS[result.reason], `ack_link_${result.reason}`, ackLinkProblemMessage(result.reason));
}, { maxBodyBytes: PUBLIC_MAX_BODY_BYTES });
