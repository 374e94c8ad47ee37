import type { Migration } from "../migrate";

// Tuning for the worker's write pattern, measured with scripts/bench-worker.ts:
// - channel_state.version, bumped by every write, so a worker that prepared its next batch from the
//   state it expects the current one to leave can tell whether anyone else changed it meanwhile;
// - free space in the pages of the rows updated every batch (rollups, channel state), so the updates
//   stay on their page (HOT) instead of adding index entries;
// - no second index on the rollups: they are read by asset (the primary key) and deleted by asset
//   and channel, which the primary key serves too.
export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`
    ALTER TABLE channel_state ADD COLUMN IF NOT EXISTS version bigint NOT NULL DEFAULT 0;
    ALTER TABLE channel_state SET (fillfactor = 50);
    ALTER TABLE measurement_rollups SET (fillfactor = 70);
    DROP INDEX IF EXISTS measurement_rollups_channel;
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`
    CREATE INDEX IF NOT EXISTS measurement_rollups_channel ON measurement_rollups (channel_id, bucket_s, bucket_start);
    ALTER TABLE measurement_rollups RESET (fillfactor);
    ALTER TABLE channel_state RESET (fillfactor);
    ALTER TABLE channel_state DROP COLUMN IF EXISTS version;
  `);
};
