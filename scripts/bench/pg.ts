import pg from "pg";

// Database helpers shared by the TypeScript benchmarks: each creates and drops a database of its own.
// PG_ADMIN_URL, or the project's own cluster on the port it was given (.data/pg-port), set by ensureBenchPostgres.
export let adminUrl = process.env.PG_ADMIN_URL ?? "";

// The project's own cluster (installed and started as `npm test` does) unless PG_ADMIN_URL names another server.
export async function ensureBenchPostgres(): Promise<void> {
  if (process.env.PG_ADMIN_URL) return;
  const { PG_PORT, startPostgres } = await import("../lib/postgres.mjs");
  startPostgres();
  adminUrl = `postgres://postgres@127.0.0.1:${PG_PORT}/postgres`;
}

export function dbUrl(name: string): string {
  const url = new URL(adminUrl);
  url.pathname = `/${name}`;
  return url.toString();
}

export async function withClient<T>(url: string, fn: (c: pg.Client) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    return await fn(client);
  } finally {
    await client.end();
  }
}
