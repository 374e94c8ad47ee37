import { notFound } from "next/navigation";
import { isNotFound } from "../errors";
import { isUuid } from "../validations/common";

/**
 * What a page shows for the id in its URL: `find(id)`, or the not-found screen when the id is not an
 * id or names nothing in the user's organisation. Other errors go on to the error screen.
 */
export async function findOrNotFound<T>(id: string, find: (id: string) => Promise<T>): Promise<T> {
  if (!isUuid(id)) notFound();
  try {
    return await find(id);
  } catch (err) {
    if (isNotFound(err)) notFound();
    throw err;
  }
}
