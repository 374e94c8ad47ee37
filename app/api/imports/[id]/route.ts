import { requirePermission } from "@/lib/auth/session";
import { findUpload } from "@/lib/services/imports";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";

/** One upload with its progress and its errors by line; the screen polls it while the file is read. */
export const GET = route<IdContext>(async (_req, ctx) => {
  const user = await requirePermission("import:manage");
  return Response.json(await findUpload(user.organisationId, await idParam(ctx, "That upload")));
});
