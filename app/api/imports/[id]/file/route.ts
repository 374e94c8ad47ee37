import { actorOf, requirePermission } from "@/lib/auth/session";
import { processUpload } from "@/lib/services/imports";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { spoolBody } from "@/lib/http/spool";
import { MAX_UPLOAD_BYTES } from "@/lib/validations/import";

/**
 * The file itself as the raw body (text/csv); answers the finished upload. The body is written to a
 * temporary file first and the import's transaction starts only once it has all arrived, so a client
 * that stalls holds no database connection; one that stops sending for 30 s is cut short.
 */
export const PUT = route<IdContext>(
  async (req, ctx) => {
    const user = await requirePermission("import:manage");
    const id = await idParam(ctx, "That upload");
    const declared = req.headers.get("content-length");
    const length = declared !== null && /^\d+$/.test(declared) ? Number(declared) : null;
    // A missing, empty or oversized body is refused by processUpload without reading it.
    if (length === null || length === 0 || length > MAX_UPLOAD_BYTES || !req.body) return Response.json(await processUpload(actorOf(user), id, req.body, length));
    const spooled = await spoolBody(req.body, MAX_UPLOAD_BYTES);
    try {
      return Response.json(await processUpload(actorOf(user), id, spooled.open(), length));
    } finally {
      await spooled.remove();
    }
  },
  { bodyTypes: ["text/csv"], maxBodyBytes: MAX_UPLOAD_BYTES },
);
