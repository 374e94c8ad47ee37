import type { SessionUser } from "../auth/session";
import { listUsers } from "./users";

/** The addresses (lower-cased) whose mail an admin of this user's organisation may read in the sink. */
export async function organisationAddresses(user: SessionUser): Promise<Set<string>> {
  return new Set((await listUsers(user.organisationId)).map((u) => u.email.toLowerCase()));
}
