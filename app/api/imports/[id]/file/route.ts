import { actorOf, requirePermission } from "@/lib/auth/session";
import { processUpload } from "@/lib/services/imports";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";

/** The file itself as the raw body (text/csv), read as it streams in; answers the finished upload. */
export const PUT = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("import:manage");
  const id = await idParam(ctx, "That upload");
  const declared = req.headers.get("content-length");
  const length = declared !== null && /^\d+$/.test(declared) ? Number(declared) : null;
  return Response.json(await processUpload(actorOf(user), id, req.body, length));
});
