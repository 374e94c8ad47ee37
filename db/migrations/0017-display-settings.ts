import type { Migration } from "../migrate";

// How people read figures (lib/format/display.ts): the organisation's unit system, decimal separator and
// clock, and each user's own choice of each (NULL follows the organisation). The database and the APIs
// stay SI whatever is chosen here.
export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`
    ALTER TABLE organisations
      ADD COLUMN unit_system text NOT NULL DEFAULT 'si' CHECK (unit_system IN ('si', 'us')),
      ADD COLUMN decimal_separator text NOT NULL DEFAULT '.' CHECK (decimal_separator IN ('.', ',')),
      ADD COLUMN clock text NOT NULL DEFAULT '24h' CHECK (clock IN ('12h', '24h'));
    ALTER TABLE users
      ADD COLUMN unit_system text CHECK (unit_system IN ('si', 'us')),
      ADD COLUMN decimal_separator text CHECK (decimal_separator IN ('.', ',')),
      ADD COLUMN clock text CHECK (clock IN ('12h', '24h'));
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`
    ALTER TABLE users DROP COLUMN unit_system, DROP COLUMN decimal_separator, DROP COLUMN clock;
    ALTER TABLE organisations DROP COLUMN unit_system, DROP COLUMN decimal_separator, DROP COLUMN clock;
  `);
};
