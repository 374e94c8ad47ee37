import type { Migration } from "../migrate";

// Late temperature samples: when a site's temperature channel delivers readings after its other
// channels' readings of the same times were measured, those fell back to the fixed or default
// temperature. Each statement that stores new samples from a temperature channel notes the span of
// times it covered, per site; the worker checks the measurements around each span and files a
// recompute where a sample now applies. The spans are noted by a trigger, in the same transaction as
// the samples, so none is missed however the worker's writes change; a high-water mark over a
// sequence could skip samples that commit out of order when several workers run. Imported samples
// are left out: an import files its own recompute of the site.
export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`
    CREATE TABLE temperature_sample_spans (
      id bigserial PRIMARY KEY,
      site_id uuid NOT NULL REFERENCES sites(id) ON DELETE CASCADE,
      from_at timestamptz NOT NULL,
      to_at timestamptz NOT NULL,
      -- Set by the first check; the span is checked once more a little later and then deleted.
      checked_at timestamptz
    );

    CREATE OR REPLACE FUNCTION note_temperature_sample_spans() RETURNS trigger AS $$
    BEGIN
      INSERT INTO temperature_sample_spans (site_id, from_at, to_at)
        SELECT site_id, min(at), max(at) FROM new_samples WHERE source = 'channel' GROUP BY site_id;
      RETURN NULL;
    END $$ LANGUAGE plpgsql;
    -- Only rows actually inserted reach the transition table: a resend that updates a sample adds none.
    CREATE TRIGGER temperature_samples_note_spans AFTER INSERT ON temperature_samples REFERENCING NEW TABLE AS new_samples
      FOR EACH STATEMENT EXECUTE FUNCTION note_temperature_sample_spans();
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`
    DROP TRIGGER IF EXISTS temperature_samples_note_spans ON temperature_samples;
    DROP FUNCTION IF EXISTS note_temperature_sample_spans();
    DROP TABLE IF EXISTS temperature_sample_spans;
  `);
};
