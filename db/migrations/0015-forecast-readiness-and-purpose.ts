import type { Migration } from "../migrate";

// Tank forecasts by purpose, with their readiness (lib/forecast/purpose.ts projectTank, DEVELOPERS.md
// "Forecast readiness"). The worker stores what the data say, dated absolutely:
// - purpose: the tank's purpose when projected; status: not_ready, due_now, due, not_due, alarms_only,
//   no_level_set; action: deliver (supply), pump_out (sump), top_up (reserve below its minimum);
// - ready / span_hours / points / r_squared: the readiness verdict and its figures (null where the
//   purpose or the level needs no forecast), reason: why not ready, not moving or not plannable;
// - due_at: when the mark is reached (reorder level, pump-out level); limit_at: a supply tank empty, a
//   sump overflowing; volume_l: litres to deliver, pump out or top up; rate_l_per_day: towards the mark.
// "Needs a check" (an open fault flag, a stale value) and a due date that has passed depend on the
// moment of reading, so the read models apply them (planRow) and they are not stored.
// The old days_to_reorder / days_to_empty counted from the computation, not from the reading; they go,
// with reorder_at / empty_at and reorder_volume_l, which due_at / limit_at / volume_l replace for every
// purpose. Stored forecasts are a cache: they are dropped and the worker projects every tank again.
export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`
    DELETE FROM tank_forecasts;
    ALTER TABLE tank_forecasts
      DROP COLUMN days_to_reorder, DROP COLUMN days_to_empty, DROP COLUMN reorder_at, DROP COLUMN empty_at, DROP COLUMN reorder_volume_l,
      ADD COLUMN purpose tank_purpose NOT NULL,
      ADD COLUMN status text NOT NULL
        CONSTRAINT tank_forecasts_status CHECK (status IN ('not_ready', 'due_now', 'due', 'not_due', 'alarms_only', 'no_level_set')),
      ADD COLUMN action text CONSTRAINT tank_forecasts_action CHECK (action IN ('deliver', 'pump_out', 'top_up')),
      ADD COLUMN reason text,
      ADD COLUMN ready boolean,
      ADD COLUMN span_hours double precision,
      ADD COLUMN points integer,
      ADD COLUMN r_squared double precision,
      ADD COLUMN due_at timestamptz,
      ADD COLUMN limit_at timestamptz,
      ADD COLUMN volume_l double precision,
      ADD COLUMN rate_l_per_day double precision,
      ADD CONSTRAINT tank_forecasts_due_has_date CHECK (status <> 'due' OR due_at IS NOT NULL);
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`
    DELETE FROM tank_forecasts;
    ALTER TABLE tank_forecasts
      DROP CONSTRAINT tank_forecasts_due_has_date,
      DROP COLUMN purpose, DROP COLUMN status, DROP COLUMN action, DROP COLUMN reason, DROP COLUMN ready, DROP COLUMN span_hours,
      DROP COLUMN points, DROP COLUMN r_squared, DROP COLUMN due_at, DROP COLUMN limit_at, DROP COLUMN volume_l, DROP COLUMN rate_l_per_day,
      ADD COLUMN reorder_volume_l double precision,
      ADD COLUMN days_to_reorder double precision,
      ADD COLUMN days_to_empty double precision,
      ADD COLUMN reorder_at timestamptz,
      ADD COLUMN empty_at timestamptz;
  `);
};
