import type { Migration } from "../migrate";

// Questions before storing (issue 15 §6):
// - a wrong manual dip is voided, never deleted: who voided it, when and why stay beside it; a voided
//   dip is left out of calibration, drift detection and the asset's chart, and listed struck through;
// - an import keeps the questions it raised about its rows (a temperature sample far from its
//   neighbours, "looks like °F?"), so the result can list them and the operator can still decide.
export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`
    ALTER TABLE manual_dips
      ADD COLUMN voided_at timestamptz,
      ADD COLUMN voided_by uuid REFERENCES users(id) ON DELETE SET NULL,
      ADD COLUMN void_reason text,
      ADD CONSTRAINT manual_dips_void_has_reason CHECK ((voided_at IS NULL) = (void_reason IS NULL));
    ALTER TABLE uploads ADD COLUMN questions jsonb NOT NULL DEFAULT '[]'::jsonb;
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`
    ALTER TABLE uploads DROP COLUMN IF EXISTS questions;
    ALTER TABLE manual_dips DROP CONSTRAINT IF EXISTS manual_dips_void_has_reason,
      DROP COLUMN IF EXISTS void_reason, DROP COLUMN IF EXISTS voided_by, DROP COLUMN IF EXISTS voided_at;
  `);
};
