// The worker's queue of readings to measure. It carries what the worker converts of each reading, so
// a claim returns the batch itself; every path that stores readings queues them the same way.

/** Columns of a reading the queue carries besides its id and time. */
export const QUEUED_READING_COLUMNS = ["device_id", "channel", "echo_us", "ticks", "overflows", "samples_us", "pulse_us", "high_us", "period_us", "air_temp_c"] as const;

const columns = QUEUED_READING_COLUMNS.join(", ");

/** The RETURNING clause of an INSERT INTO readings whose rows are then queued by QUEUE_INSERTED. */
export const RETURNING_QUEUED_COLUMNS = `RETURNING id, at, ${columns}`;

/** A CTE `queued` that queues the rows a CTE `inserted` (with RETURNING_QUEUED_COLUMNS) stored. */
export const QUEUE_INSERTED = `queued AS (INSERT INTO reading_queue (reading_id, at, ${columns}) SELECT id, at, ${columns} FROM inserted RETURNING 1)`;
