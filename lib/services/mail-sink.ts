import type { SessionUser } from "../auth/session";
import { sqlRows } from "../db/sql";

/**
 * The addresses (lower-cased) whose mail an admin of this user's organisation may read in the sink: its
 * members' addresses that no other organisation also holds. An invite may name an address another
 * organisation uses (docs/security.md, "Invites and other organisations' addresses"); mail to such an
 * address could be the other organisation's, so neither sees it here.
 */
export async function organisationAddresses(user: SessionUser): Promise<Set<string>> {
  const rows = await sqlRows<{ email: string }>(
    `SELECT lower(u.email) AS email FROM users u
      WHERE u.organisation_id = :organisationId
        AND NOT EXISTS (SELECT 1 FROM users o WHERE lower(o.email) = lower(u.email) AND o.organisation_id <> u.organisation_id)`,
    { organisationId: user.organisationId },
    { primary: true },
  );
  return new Set(rows.map((r) => r.email));
}
