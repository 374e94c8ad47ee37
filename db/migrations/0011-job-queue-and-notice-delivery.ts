import { runMigrations } from "graphile-worker";
import type { Migration } from "../migrate";
import { env } from "../../lib/env";

// Background jobs on graphile-worker (DEVELOPERS.md, "Background jobs"): its schema is installed here,
// so every database our migrations make — the local one, each test's throwaway one — can take jobs
// from the first transaction on (`graphile_worker.add_job` in the same transaction as the change).
// The worker runs graphile-worker's own migrations again when it starts, which is a no-op when current.
//
// Alarm notices become an outbox: a notification row is queued with its alarm change and sent by a job;
// each row says when a failed send is tried next and why a notice was held back instead of sent.
// An acknowledge link refused for any reason is spent (used_at) with the refusal kept beside it.
export const up: Migration = async ({ context }) => {
  await runMigrations({ connectionString: env.databaseUrl });
  await context.sequelize.query(`
    ALTER TABLE alarm_notifications
      ADD COLUMN next_attempt_at timestamptz,
      ADD COLUMN held_reason text CHECK (held_reason IN ('cleared_before_notice', 'no_longer_needed', 'link_expired')),
      ADD COLUMN refusal text;
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`
    ALTER TABLE alarm_notifications DROP COLUMN next_attempt_at, DROP COLUMN held_reason, DROP COLUMN refusal;
    DROP SCHEMA IF EXISTS graphile_worker CASCADE;
  `);
};
