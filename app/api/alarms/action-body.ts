import type { z } from "zod";
import { HttpError } from "@/lib/http/errors";
import { parseOptionalBody } from "@/lib/validations/alarm";

/** Reads an action's JSON body, which may be empty; malformed JSON is a 400 like everywhere else. */
export async function actionBody<S extends z.ZodType>(req: Request, schema: S): Promise<z.infer<S>> {
  const parsed = parseOptionalBody(await req.text(), schema);
  if (!parsed.ok) throw new HttpError(400, "malformed_json", "The body is not valid JSON.");
  return parsed.value;
}
