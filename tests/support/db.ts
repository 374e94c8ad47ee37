import pg from "pg";
import bcrypt from "bcryptjs";
import { randomUUID } from "node:crypto";

// Direct database access for test set-up and for checking what was (not) stored. Never a mock.
export async function sql<T extends pg.QueryResultRow = pg.QueryResultRow>(text: string, params: unknown[] = []): Promise<T[]> {
  const client = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await client.connect();
  try {
    return (await client.query<T>(text, params)).rows;
  } finally {
    await client.end();
  }
}

/** A second organisation with its own admin, to prove that nothing crosses between organisations. */
export async function createOtherOrganisation(): Promise<{ organisationId: string; adminEmail: string; password: string }> {
  const organisationId = randomUUID();
  const adminEmail = `other-admin-${organisationId.slice(0, 8)}@example.org`;
  const password = "other-org-password";
  await sql(`INSERT INTO organisations (id, name) VALUES ($1, $2)`, [organisationId, `Other organisation ${organisationId.slice(0, 8)}`]);
  await sql(`INSERT INTO users (organisation_id, email, name, role, status, password_hash) VALUES ($1, $2, 'Other Admin', 'admin', 'active', $3)`, [
    organisationId,
    adminEmail,
    await bcrypt.hash(password, 4),
  ]);
  return { organisationId, adminEmail, password };
}
