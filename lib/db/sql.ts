// The one way to run SQL by hand. Parameters are named (`:name`, an object) or positional (`$1`, an
// array: the worker's binary arrays and unnest() statements); a statement may be given a prepared name
// (PostgreSQL parses and plans it once per connection); inside a transaction it runs on that
// transaction's connection. Where it runs: with read replicas configured, only a statement that cannot
// write goes to the read pool; everything else, anything in a transaction, anything marked `primary`
// and anything inside onPrimary() goes to the primary.

import { createHash } from "node:crypto";
import type { ClientBase } from "pg";
import { QueryTypes, type Transaction } from "sequelize";
import { getSequelize } from "./sequelize";

export type SqlParams = Readonly<Record<string, unknown>> | readonly unknown[];

export interface SqlOptions {
  transaction?: Transaction | null;
  /**
   * A prepared statement's name, for statements run on every request (positional parameters only). A
   * hash of the text is added, so one name may stand for variants of a statement (a viewer's sites).
   */
  name?: string;
  /** Read from the primary: a read that must see a write just made, or that decides one. */
  primary?: boolean;
}

// What makes a statement able to change something. A false alarm only sends a read to the primary;
// a statement that writes through a function of its own must say `primary: true`.
const WRITES = /\b(insert|update|delete|merge|truncate|create|alter|drop|copy|call|lock|refresh|notify|listen|vacuum)\b|\bfor\s+(no\s+key\s+)?(update|share|key\s+share)\b|\b(nextval|setval|pg_advisory\w*|pg_notify|set_config|ensure_\w+)\s*\(/i;

/** Whether a statement only reads, so that a read replica may answer it. */
export function isReadOnlyStatement(text: string): boolean {
  return /^\s*\(?\s*(select|with|values|table)\b/i.test(text) && !WRITES.test(text);
}

interface ConnectionManager {
  getConnection(options: { type: string; useMaster: boolean }): Promise<ClientBase>;
  releaseConnection(connection: ClientBase): Promise<void> | void;
}

/** The rows a statement answers (RETURNING rows for a write). */
export async function sqlRows<T extends object>(text: string, params: SqlParams = [], options: SqlOptions = {}): Promise<T[]> {
  const readOnly = !options.primary && isReadOnlyStatement(text);
  const transaction = options.transaction ?? undefined;
  if (options.name) {
    if (!Array.isArray(params)) throw new TypeError(`prepared statement ${options.name} takes positional parameters`);
    return prepared<T>(`${options.name}.${createHash("sha1").update(text).digest("base64url").slice(0, 16)}`, text, params, readOnly, transaction);
  }
  const sequelize = getSequelize();
  const values = Array.isArray(params) ? { bind: params as unknown[] } : { replacements: params as Record<string, unknown> };
  if (readOnly) return sequelize.query<T>(text, { ...values, type: QueryTypes.SELECT, transaction });
  const [rows] = await sequelize.query(text, { ...values, type: QueryTypes.RAW, transaction, useMaster: true });
  return (rows ?? []) as T[];
}

/** Runs a statement for what it does. */
export async function sqlRun(text: string, params: SqlParams = [], options: SqlOptions = {}): Promise<void> {
  await sqlRows(text, params, options);
}

async function prepared<T>(name: string, text: string, values: readonly unknown[], readOnly: boolean, transaction: Transaction | undefined): Promise<T[]> {
  const own = transaction as unknown as { connection?: ClientBase } | undefined;
  if (own?.connection) return (await own.connection.query({ name, text, values: [...values] })).rows as T[];
  const manager = getSequelize().connectionManager as unknown as ConnectionManager;
  const connection = await manager.getConnection({ type: readOnly ? "SELECT" : "RAW", useMaster: !readOnly });
  try {
    return (await connection.query({ name, text, values: [...values] })).rows as T[];
  } finally {
    await manager.releaseConnection(connection);
  }
}

/** Statements on one held connection (see withSession). */
export type SessionSql = <T extends object>(text: string, params?: readonly unknown[]) => Promise<T[]>;

/**
 * Runs `fn` with one primary connection held throughout, outside any transaction: for session-level
 * state that must outlive transactions (the worker's lane locks). The session's advisory locks are
 * released before the connection goes back to the pool.
 */
export async function withSession<T>(fn: (sql: SessionSql) => Promise<T>): Promise<T> {
  const manager = getSequelize().connectionManager as unknown as ConnectionManager;
  const connection = await manager.getConnection({ type: "RAW", useMaster: true });
  const run: SessionSql = async <R extends object>(text: string, params: readonly unknown[] = []) => (await connection.query(text, [...params])).rows as R[];
  try {
    return await fn(run);
  } finally {
    await connection.query(`SELECT pg_advisory_unlock_all()`).catch(() => undefined);
    await manager.releaseConnection(connection);
  }
}
