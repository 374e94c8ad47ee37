import type { Migration } from "../migrate";

// CSV uploads with their progress and line errors (the import history), and the history of channel
// calibrations fitted from manual dips (who, when, before and after).
export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`
    CREATE TABLE uploads (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      organisation_id uuid NOT NULL REFERENCES organisations(id) ON DELETE CASCADE,
      by_user_id uuid REFERENCES users(id) ON DELETE SET NULL,
      kind text NOT NULL CHECK (kind IN ('readings', 'strapping', 'dips', 'temperature')),
      target_id uuid NOT NULL,
      target_label text NOT NULL,
      file_name text NOT NULL,
      size_bytes bigint NOT NULL,
      mode text NOT NULL CHECK (mode IN ('all_or_nothing', 'good_rows')),
      status text NOT NULL DEFAULT 'waiting' CHECK (status IN ('waiting', 'processing', 'imported', 'partial', 'rejected')),
      bytes_read bigint NOT NULL DEFAULT 0,
      lines_read integer NOT NULL DEFAULT 0,
      rows_valid integer NOT NULL DEFAULT 0,
      rows_imported integer NOT NULL DEFAULT 0,
      error_count integer NOT NULL DEFAULT 0,
      -- The first errors by line, [{ "line": n, "message": "…" }]; error_count has them all.
      errors jsonb NOT NULL DEFAULT '[]',
      message text,
      created_at timestamptz NOT NULL DEFAULT now(),
      started_at timestamptz,
      finished_at timestamptz
    );
    CREATE INDEX uploads_organisation_created ON uploads (organisation_id, created_at DESC);

    CREATE TABLE calibration_changes (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      organisation_id uuid NOT NULL REFERENCES organisations(id) ON DELETE CASCADE,
      channel_id uuid NOT NULL REFERENCES channels(id) ON DELETE CASCADE,
      asset_id uuid REFERENCES assets(id) ON DELETE SET NULL,
      by_user_id uuid REFERENCES users(id) ON DELETE SET NULL,
      by_label text NOT NULL,
      at timestamptz NOT NULL DEFAULT now(),
      before_offset_m double precision NOT NULL,
      before_scale double precision NOT NULL,
      after_offset_m double precision NOT NULL,
      after_scale double precision NOT NULL,
      fit_mode text NOT NULL CHECK (fit_mode IN ('offset_and_scale', 'offset_only')),
      dip_ids uuid[] NOT NULL,
      -- Per dip: { "dip_id", "at", "dip_level_m", "raw_distance_m", "residual_before_m", "residual_after_m" }.
      residuals jsonb NOT NULL,
      rms_before_m double precision NOT NULL,
      rms_after_m double precision NOT NULL,
      note text
    );
    CREATE INDEX calibration_changes_channel_at ON calibration_changes (channel_id, at DESC);
    CREATE INDEX calibration_changes_asset_at ON calibration_changes (asset_id, at DESC);
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`DROP TABLE IF EXISTS calibration_changes, uploads CASCADE;`);
};
