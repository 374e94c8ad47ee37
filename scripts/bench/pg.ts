import pg from "pg";
import { PG_PORT } from "../lib/postgres.mjs";

// Database helpers shared by the TypeScript benchmarks: each creates and drops a database of its own,
// on this clone's cluster (its port is in .data/pg-port) unless PG_ADMIN_URL names another server.
export const adminUrl = process.env.PG_ADMIN_URL ?? `postgres://postgres@127.0.0.1:${PG_PORT}/postgres`;

// The project's own cluster (installed and started as `npm test` does) unless PG_ADMIN_URL names another server.
export async function ensureBenchPostgres(): Promise<void> {
  if (process.env.PG_ADMIN_URL) return;
  const { startPostgres } = await import("../lib/postgres.mjs");
  startPostgres();
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
