// Retention per organisation: raw readings are kept `reading_retention_days`, measurements
// `measurement_retention_days` (columns of organisations, migration 0010); rollups are kept for good.
// Readings and measurements live in monthly partitions shared by every organisation, so a month goes
// as a whole (DROP TABLE of its partition: no dead rows, no vacuum) once the longest retention of any
// organisation has passed its end. An organisation that keeps less than the longest has its older rows
// in the months still kept deleted in bounded batches. A month with readings still waiting for the
// worker is never dropped. The ingest's idempotency keys (reading_keys, one per (device, channel, seq),
// a table of its own) go with their readings, in the same transaction: a key without its reading
// only grows the table, and a reading without its key could be stored twice by a resend. Run once
// a day by the worker, with the partition upkeep.
import type { Transaction } from "sequelize";
import { getSequelize } from "../db/sequelize";
import { sqlRows, sqlRun } from "../db/sql";

const RETAINED = [
  { table: "readings", days: "reading_retention_days", key: "id" },
  { table: "measurements", days: "measurement_retention_days", key: "reading_id" },
] as const;

const DELETE_BATCH = 20_000;
const DELETE_BATCHES_PER_RUN = 10;
// Dropping a partition locks its parent briefly; rather than queue the ingest behind a long reader, give up and try tomorrow.
const DROP_LOCK_TIMEOUT = "5s";

export interface RetentionResult {
  droppedPartitions: string[];
  deletedRows: number;
}

interface Partition {
  name: string;
  upper: Date;
}

/** The monthly partitions of a table with their upper bounds; the default partition is never listed. */
async function monthlyPartitions(table: string): Promise<Partition[]> {
  return sqlRows<Partition>(
    `SELECT c.relname AS name, (regexp_match(pg_get_expr(c.relpartbound, c.oid), 'TO \\(''([^'']+)''\\)'))[1]::timestamptz AS upper
     FROM pg_inherits i JOIN pg_class c ON c.oid = i.inhrelid
     WHERE i.inhparent = $1::regclass AND pg_get_expr(c.relpartbound, c.oid) <> 'DEFAULT'
     ORDER BY upper`,
    [table],
    { primary: true },
  );
}

/**
 * Deletes the idempotency keys of a monthly readings partition about to be dropped, a device at a time:
 * each statement finds one device's rows by the readings' (device, channel, at) index and their keys
 * by the keys' primary key, instead of joining a whole month to the whole key table.
 */
async function deleteKeysOfPartition(partition: string, transaction: Transaction): Promise<void> {
  const devices = await sqlRows<{ id: string }>(`SELECT id FROM devices ORDER BY id`, [], { transaction });
  for (const d of devices) {
    await sqlRun(
      `DELETE FROM reading_keys k USING "${partition}" r WHERE r.device_id = $1 AND k.device_id = $1 AND k.channel = r.channel AND k.seq = r.seq`,
      [d.id],
      { transaction },
    );
  }
}

export async function applyRetention(now: Date = new Date()): Promise<RetentionResult> {
  const result: RetentionResult = { droppedPartitions: [], deletedRows: 0 };
  for (const { table, days, key } of RETAINED) {
    const [span] = await sqlRows<{ longest: number | null; shortest: number | null }>(`SELECT max(${days}) AS longest, min(${days}) AS shortest FROM organisations`, [], { primary: true });
    if (span.longest === null || span.shortest === null) continue;
    const cutoff = new Date(now.getTime() - span.longest * 86_400_000);
    for (const p of await monthlyPartitions(table)) {
      if (p.upper > cutoff || !/^(readings|measurements)_\d{4}_\d{2}$/.test(p.name)) continue;
      if (table === "readings") {
        const [waiting] = await sqlRows<{ any: boolean }>(`SELECT EXISTS (SELECT 1 FROM reading_queue WHERE at < $1) AS any`, [p.upper], { primary: true });
        if (waiting.any) continue;
      }
      await getSequelize().transaction(async (transaction: Transaction) => {
        await sqlRun(`SET LOCAL lock_timeout = '${DROP_LOCK_TIMEOUT}'`, [], { transaction });
        if (table === "readings") await deleteKeysOfPartition(p.name, transaction);
        await sqlRun(`DROP TABLE "${p.name}"`, [], { transaction });
      });
      result.droppedPartitions.push(p.name);
    }
    if (span.shortest === span.longest) continue;
    // Organisations that keep less: their rows older than their own cutoff, in the months still kept.
    const newestDoomed = new Date(now.getTime() - span.shortest * 86_400_000);
    for (let batch = 0; batch < DELETE_BATCHES_PER_RUN; batch++) {
      const [deleted] = await sqlRows<{ n: number }>(
        `WITH doomed AS (
           SELECT t.${key} AS key, t.at FROM ${table} t JOIN devices d ON d.id = t.device_id JOIN organisations o ON o.id = d.organisation_id
           WHERE t.at < $1 AND t.at < $2::timestamptz - make_interval(days => o.${days})
             ${table === "readings" ? "AND NOT EXISTS (SELECT 1 FROM reading_queue q WHERE q.reading_id = t.id)" : ""}
           LIMIT ${DELETE_BATCH}
         ), gone AS (
           DELETE FROM ${table} t USING doomed WHERE t.${key} = doomed.key AND t.at = doomed.at RETURNING ${table === "readings" ? "t.device_id, t.channel, t.seq" : "1"}
         )${table === "readings" ? `, keys AS (DELETE FROM reading_keys k USING gone g WHERE k.device_id = g.device_id AND k.channel = g.channel AND k.seq = g.seq)` : ""}
         SELECT count(*)::int AS n FROM gone`,
        [newestDoomed, now],
      );
      result.deletedRows += deleted.n;
      if (deleted.n < DELETE_BATCH) break;
    }
  }
  return result;
}
