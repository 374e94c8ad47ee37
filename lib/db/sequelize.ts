import { AsyncLocalStorage } from "node:async_hooks";
import pg from "pg";
import { Sequelize, type Options } from "sequelize";
import { env } from "../env";

// One Sequelize instance per process; the web server and the worker share this module. With
// DATABASE_REPLICA_URLS set, Sequelize's `replication` sends plain reads to the replicas and everything
// else (writes, transactions, reads that must see this request's own writes) to DATABASE_URL.
const globalForDb = globalThis as unknown as { halftripSequelize?: Sequelize };

const primaryOnly = new AsyncLocalStorage<true>();

/**
 * Runs `work` with every statement on the primary, reads included: for a request that changes something
 * and then reads what it changed, or a check that must not see a replica's lag.
 */
export function onPrimary<T>(work: () => Promise<T>): Promise<T> {
  return primaryOnly.run(true, work);
}

/** Sequelize's per-connection settings of a connection string (replicas are given as objects, not URLs). */
function connectionOptions(url: string) {
  const u = new URL(url);
  // libpq's URI parameters that name the session (application_name) or set its defaults (options, e.g.
  // "-c default_transaction_read_only=on", which makes a read pool on the primary behave as a replica).
  const session = Object.fromEntries(["application_name", "options"].flatMap((k) => (u.searchParams.get(k) ? [[k, u.searchParams.get(k)]] : [])));
  return {
    host: u.hostname,
    port: u.port ? Number(u.port) : 5432,
    username: decodeURIComponent(u.username),
    password: decodeURIComponent(u.password),
    database: decodeURIComponent(u.pathname.replace(/^\//, "")),
    // A session left idle inside a transaction, or a statement that runs away, is ended by the server
    // instead of holding a pooled connection and its locks (DB_STATEMENT_TIMEOUT_MS for long maintenance).
    dialectOptions: {
      ...session,
      statement_timeout: env.dbTimeouts.statementMs,
      idle_in_transaction_session_timeout: env.dbTimeouts.idleInTransactionMs,
    },
  };
}

function createSequelize(): Sequelize {
  const primary = connectionOptions(env.databaseUrl);
  const replicas = env.replicaUrls.map(connectionOptions);
  const options: Options = {
    dialect: "postgres",
    dialectModule: pg,
    logging: false,
    ...primary,
    ...(replicas.length > 0 ? { replication: { write: primary, read: replicas } } : {}),
    pool: { max: env.dbPoolMax, min: 0, idle: 10000, acquire: 5000 },
    define: { underscored: true, timestamps: true, createdAt: "created_at", updatedAt: "updated_at" },
  };
  const sequelize = new Sequelize(options);
  sequelize.addHook("beforePoolAcquire", (acquire) => {
    if (acquire && primaryOnly.getStore()) (acquire as { useMaster?: boolean }).useMaster = true;
  });
  return sequelize;
}

export function getSequelize(): Sequelize {
  if (!globalForDb.halftripSequelize) globalForDb.halftripSequelize = createSequelize();
  return globalForDb.halftripSequelize;
}

export async function isDatabaseUp(): Promise<boolean> {
  try {
    await getSequelize().query("SELECT 1");
    return true;
  } catch {
    return false;
  }
}
