import type { Migration } from "../migrate";

// The worker claims the oldest waiting readings first (ORDER BY at), so a site's temperature channel
// and its other channels are measured together even when devices upload their history one after
// another, and each channel's readings reach the stateful stages in time order. This index keeps that
// claim an index scan however long the queue.
export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`CREATE INDEX IF NOT EXISTS reading_queue_at ON reading_queue (at, reading_id);`);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`DROP INDEX IF EXISTS reading_queue_at;`);
};
