import type { Migration } from "../migrate";

// Retention per organisation (lib/services/retention.ts): raw readings are kept reading_retention_days,
// measurements measurement_retention_days; rollups are kept for good. Defaults in DEVELOPERS.md.
export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`
    ALTER TABLE organisations
      ADD COLUMN reading_retention_days integer NOT NULL DEFAULT 90 CHECK (reading_retention_days >= 31),
      ADD COLUMN measurement_retention_days integer NOT NULL DEFAULT 730 CHECK (measurement_retention_days >= 31);
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`
    ALTER TABLE organisations DROP COLUMN reading_retention_days, DROP COLUMN measurement_retention_days;
  `);
};
