import type { Migration } from "../migrate";

// Workers claim from lanes of devices (lib/worker/lanes.ts: `uuid_hash(device_id) & 15`, LANE_COUNT 16).
// Without statistics on that expression the planner guesses a lane filter keeps 0.5 % of the queue per
// lane, judges a 40 000-reading claim to need every row, and sorts the whole queue instead of walking
// its time index: 0.87 s instead of 0.13–0.29 s per claim on a 400 000-reading backlog. ANALYZE (and
// autovacuum's) fills them in.
export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`
    CREATE STATISTICS IF NOT EXISTS reading_queue_lane ON ((uuid_hash(device_id) & 15)) FROM reading_queue;
    ANALYZE reading_queue;
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`DROP STATISTICS IF EXISTS reading_queue_lane;`);
};
