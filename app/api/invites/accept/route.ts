import { acceptInvite } from "@/lib/services/users";
import { HttpError, parseJsonBody, PUBLIC_MAX_BODY_BYTES } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { acceptInviteSchema } from "@/lib/validations/user";
import { inviteProblem } from "@/lib/auth/invite-messages";
import { COMMON_PASSWORD_MESSAGE, isCommonPassword } from "@/lib/auth/password-list";

// The form checks length and shape; the list of common and breached passwords is checked here only.
const acceptInviteOnServer = acceptInviteSchema.superRefine((v, ctx) => {
  if (isCommonPassword(v.password)) ctx.addIssue({ code: "custom", path: ["password"], message: COMMON_PASSWORD_MESSAGE });
});

// Public by design: the signed, single-use token is the credential.
export const POST = route(async (req) => {
  const { token, password } = await parseJsonBody(req, acceptInviteOnServer, PUBLIC_MAX_BODY_BYTES);
  const result = await acceptInvite(token, password);
  if (!result.ok) throw new HttpError(410, `invite_${result.reason}`, inviteProblem(result.reason));
  return Response.json({ ok: true, email: result.email });
}, { maxBodyBytes: PUBLIC_MAX_BODY_BYTES });
