import { actorOf, requirePermission } from "@/lib/auth/session";
import { readSamplesAsFahrenheit } from "@/lib/services/imports";
import { parseJsonBody } from "@/lib/http/errors";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { readAsFahrenheitSchema } from "@/lib/validations/import";

/** The operator's answer to "looks like °F?": the chosen questioned samples are read as °F. */
export const POST = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("import:manage");
  const id = await idParam(ctx, "That upload");
  const input = await parseJsonBody(req, readAsFahrenheitSchema);
  return Response.json(await readSamplesAsFahrenheit(actorOf(user), id, input.lines));
});
