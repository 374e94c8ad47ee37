import type { Migration } from "../migrate";

// The newest valid measurement of each channel, kept by the worker as it writes measurements
// (lib/worker/batch-store.ts upsertLatestValues): the overview, site and asset screens join this small
// table instead of probing the monthly partitions of measurements for every asset. Filled here from
// the measurements already stored (one index probe per channel).
export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`
    CREATE TABLE channel_latest (
      channel_id uuid PRIMARY KEY REFERENCES channels(id) ON DELETE CASCADE,
      reading_id bigint NOT NULL,
      at timestamptz NOT NULL,
      distance_m double precision,
      level_m double precision,
      volume_l double precision,
      fill_pct double precision,
      uncertainty_m double precision,
      occupied boolean
    );
    INSERT INTO channel_latest (channel_id, reading_id, at, distance_m, level_m, volume_l, fill_pct, uncertainty_m, occupied)
    SELECT c.id, m.reading_id, m.at, m.distance_m, m.level_m, m.volume_l, m.fill_pct, m.uncertainty_m, m.occupied
    FROM channels c
    CROSS JOIN LATERAL (
      SELECT * FROM measurements m WHERE m.channel_id = c.id AND m.status = 'ok' ORDER BY m.at DESC, m.reading_id DESC LIMIT 1
    ) m;
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`DROP TABLE channel_latest;`);
};
