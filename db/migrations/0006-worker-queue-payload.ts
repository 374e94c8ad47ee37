import type { Migration } from "../migrate";

// Throughput of the measurement worker, measured with scripts/bench-worker.ts:
// - the queue carries what the worker reads of each reading, so a claim returns the batch itself
//   (finding 25 000 claimed readings again in their partition took longer than claiming them);
// - the rollups lose their foreign keys: checking two parent rows for every bucket written cost half
//   of each rollup write. Measurements never had them (history outlives a channel's configuration),
//   so rollups of a removed channel now stay beside its measurements too; the rollups of a deleted
//   asset are deleted with it by a trigger, as the cascade did.
export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`
    ALTER TABLE reading_queue
      ADD COLUMN device_id uuid, ADD COLUMN channel smallint, ADD COLUMN echo_us double precision, ADD COLUMN ticks bigint,
      ADD COLUMN overflows integer, ADD COLUMN samples_us double precision[], ADD COLUMN pulse_us double precision,
      ADD COLUMN high_us double precision, ADD COLUMN period_us double precision, ADD COLUMN air_temp_c double precision;
    UPDATE reading_queue q SET device_id = r.device_id, channel = r.channel, echo_us = r.echo_us, ticks = r.ticks, overflows = r.overflows,
      samples_us = r.samples_us, pulse_us = r.pulse_us, high_us = r.high_us, period_us = r.period_us, air_temp_c = r.air_temp_c
      FROM readings r WHERE r.id = q.reading_id AND r.at = q.at;
    -- A queued reading that no longer exists was dropped by the worker's claim until now.
    DELETE FROM reading_queue WHERE device_id IS NULL;
    ALTER TABLE reading_queue ALTER COLUMN device_id SET NOT NULL, ALTER COLUMN channel SET NOT NULL;

    ALTER TABLE measurement_rollups DROP CONSTRAINT IF EXISTS measurement_rollups_asset_id_fkey,
      DROP CONSTRAINT IF EXISTS measurement_rollups_channel_id_fkey;
    CREATE OR REPLACE FUNCTION delete_rollups_of_deleted_assets() RETURNS trigger AS $$
    BEGIN
      DELETE FROM measurement_rollups r USING deleted_assets d WHERE r.asset_id = d.id;
      RETURN NULL;
    END $$ LANGUAGE plpgsql;
    CREATE TRIGGER assets_delete_rollups AFTER DELETE ON assets REFERENCING OLD TABLE AS deleted_assets
      FOR EACH STATEMENT EXECUTE FUNCTION delete_rollups_of_deleted_assets();
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`
    DROP TRIGGER IF EXISTS assets_delete_rollups ON assets;
    DROP FUNCTION IF EXISTS delete_rollups_of_deleted_assets();
    DELETE FROM measurement_rollups r WHERE NOT EXISTS (SELECT 1 FROM assets a WHERE a.id = r.asset_id)
      OR NOT EXISTS (SELECT 1 FROM channels c WHERE c.id = r.channel_id);
    ALTER TABLE measurement_rollups
      ADD CONSTRAINT measurement_rollups_asset_id_fkey FOREIGN KEY (asset_id) REFERENCES assets(id) ON DELETE CASCADE,
      ADD CONSTRAINT measurement_rollups_channel_id_fkey FOREIGN KEY (channel_id) REFERENCES channels(id) ON DELETE CASCADE;
    ALTER TABLE reading_queue DROP COLUMN device_id, DROP COLUMN channel, DROP COLUMN echo_us, DROP COLUMN ticks, DROP COLUMN overflows,
      DROP COLUMN samples_us, DROP COLUMN pulse_us, DROP COLUMN high_us, DROP COLUMN period_us, DROP COLUMN air_temp_c;
  `);
};
