import { actorOf, requirePermission } from "@/lib/auth/session";
import { createUpload, listUploads } from "@/lib/services/imports";
import { parseJsonBody, parseQuery } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { createUploadSchema, listUploadsQuery } from "@/lib/validations/import";

/** The upload history, newest first. */
export const GET = route(async (req) => {
  const user = await requirePermission("import:manage");
  const { limit } = parseQuery(req.url, listUploadsQuery);
  return Response.json({ items: await listUploads(user.organisationId, limit) });
});

/** Starts an upload: names the file, its size, what it imports into and the mode; the file follows with PUT …/file. */
export const POST = route(async (req) => {
  const user = await requirePermission("import:manage");
  const input = await parseJsonBody(req, createUploadSchema);
  return Response.json(await createUpload(actorOf(user), input), { status: 201 });
});
