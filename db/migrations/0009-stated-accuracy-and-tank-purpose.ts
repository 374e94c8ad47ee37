import type { Migration } from "../migrate";

// Two fields of the numbers round:
// - channels.stated_accuracy_m: the transducer's stated accuracy (half-width, metres) that the
//   uncertainty budget reads as a rectangular distribution; null means the trade default
//   (lib/uncertainty/budget.ts) applies.
// - assets.purpose: what a tank is for (supply, process, sump, reserve), which decides what its plan
//   row says (lib/forecast/purpose.ts). Existing tanks were all planned as supply tanks, so they stay
//   so; a tank stored without one is read as supply (tankPurposeOf), so older writers keep working;
//   bays and points have none.
export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`
    ALTER TABLE channels ADD COLUMN stated_accuracy_m double precision
      CONSTRAINT channels_stated_accuracy_positive CHECK (stated_accuracy_m > 0 AND stated_accuracy_m <= 1);
    CREATE TYPE tank_purpose AS ENUM ('supply', 'process', 'sump', 'reserve');
    ALTER TABLE assets ADD COLUMN purpose tank_purpose;
    UPDATE assets SET purpose = 'supply' WHERE kind = 'tank';
    ALTER TABLE assets ADD CONSTRAINT assets_purpose_tanks_only CHECK (purpose IS NULL OR kind = 'tank');
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`
    ALTER TABLE assets DROP CONSTRAINT IF EXISTS assets_purpose_tanks_only;
    ALTER TABLE assets DROP COLUMN IF EXISTS purpose;
    DROP TYPE IF EXISTS tank_purpose;
    ALTER TABLE channels DROP COLUMN IF EXISTS stated_accuracy_m;
  `);
};
