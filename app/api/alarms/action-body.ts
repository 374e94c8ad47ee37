import type { z } from "zod";
import { HttpError, readBodyWithLimit } from "@/lib/http/errors";

// An action carries a comment and perhaps a reason (500 characters each) or a list of 200 ids.
const ACTION_MAX_BODY_BYTES = 64 * 1024;
import { parseOptionalBody } from "@/lib/validations/alarm";

/** Reads an action's JSON body, which may be empty; malformed JSON is a 400 like everywhere else. */
export async function actionBody<S extends z.ZodType>(req: Request, schema: S): Promise<z.infer<S>> {
  const parsed = parseOptionalBody(await readBodyWithLimit(req, ACTION_MAX_BODY_BYTES), schema);
  if (!parsed.ok) throw new HttpError(400, "malformed_json", "The body is not valid JSON.");
  return parsed.value;
}
