import { notFound } from "../errors";
import { isUuid } from "../validations/common";

export type IdContext = { params: Promise<{ id: string }> };

/** An id that is not even a uuid cannot exist: answer 404 like an id of another organisation. */
export async function idParam(ctx: IdContext, what: string): Promise<string> {
  const { id } = await ctx.params;
  if (!isUuid(id)) throw notFound(what);
  return id;
}
