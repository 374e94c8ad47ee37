import { actorOf, requirePermission } from "@/lib/auth/session";
import { updateUser } from "@/lib/services/users";
import { notFound } from "@/lib/errors";
import { parseJsonBody } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { isUuid } from "@/lib/validations/common";
import { updateUserSchema } from "@/lib/validations/user";

export const PATCH = route<{ params: Promise<{ id: string }> }>(async (req, { params }) => {
  const admin = await requirePermission("user:manage");
  const { id } = await params;
  if (!isUuid(id)) throw notFound("That user");
  const patch = await parseJsonBody(req, updateUserSchema);
  return Response.json({ user: await updateUser(actorOf(admin), id, patch) });
});
