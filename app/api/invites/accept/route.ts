import { acceptInvite } from "@/lib/db/queries/users";
import { HttpError, parseJsonBody, PUBLIC_MAX_BODY_BYTES } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { acceptInviteSchema } from "@/lib/validations/user";
import { inviteProblem } from "@/lib/auth/invite-messages";

// Public by design: the signed, single-use token is the credential.
export const POST = route(async (req) => {
  const { token, password } = await parseJsonBody(req, acceptInviteSchema, PUBLIC_MAX_BODY_BYTES);
  const result = await acceptInvite(token, password);
  if (!result.ok) throw new HttpError(410, `invite_${result.reason}`, inviteProblem(result.reason));
  return Response.json({ ok: true, email: result.email });
}, { maxBodyBytes: PUBLIC_MAX_BODY_BYTES });
