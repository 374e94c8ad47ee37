import { actorOf, requirePermission } from "@/lib/auth/session";
import { inviteUser, listUsers, INVITE_TTL_HOURS } from "@/lib/services/users";
import { parseJsonBody } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { appUrl, sendMail } from "@/lib/mail/send-mail";
import { inviteUserSchema } from "@/lib/validations/user";

export const GET = route(async () => {
  const user = await requirePermission("user:manage");
  return Response.json({ items: await listUsers(user.organisationId) });
});

export const POST = route(async (req) => {
  const admin = await requirePermission("user:manage");
  const input = await parseJsonBody(req, inviteUserSchema);
  const { user, token } = await inviteUser(actorOf(admin), input);
  const link = `${appUrl()}/invite/${token}`;
  await sendMail({
    to: user.email,
    subject: "You are invited to Halftrip",
    text: [
      `${admin.email} invited you to Halftrip as ${user.role}.`,
      "",
      `Set your password here (the link works once and expires in ${INVITE_TTL_HOURS} hours):`,
      link,
    ].join("\n"),
  });
  return Response.json({ user }, { status: 201 });
});
