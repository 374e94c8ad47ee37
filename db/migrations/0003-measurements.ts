import type { Migration } from "../migrate";

// What the worker derives from readings: measurements (partitioned by month like readings), their
// 5-minute and hourly rollups, the per-channel state that lets batches resume, sensor-health flags,
// bay occupancy sessions, site temperature samples, manual dips, tank forecasts and recompute requests.
export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`
    CREATE TABLE measurements (
      reading_id bigint NOT NULL,
      at timestamptz NOT NULL,
      device_id uuid NOT NULL,
      channel_index smallint NOT NULL,
      -- Null when the device has no channel with the reading's index (status invalid_config).
      channel_id uuid,
      asset_id uuid,
      status text NOT NULL CHECK (status IN ('ok', 'too_close', 'no_echo', 'noisy', 'out_of_bounds', 'suspect', 'invalid_config', 'invalid_value')),
      status_detail text,
      tof_us double precision,
      burst_n smallint,
      spread_us double precision,
      air_temp_c double precision,
      temp_source text CHECK (temp_source IN ('reading', 'site_samples', 'site_fixed', 'default')),
      speed_of_sound_ms double precision,
      sound_model text CHECK (sound_model IN ('dry', 'cramer')),
      raw_distance_m double precision,
      distance_m double precision,
      level_m double precision,
      volume_l double precision,
      fill_pct double precision,
      ullage_l double precision,
      occupied boolean,
      uncertainty_m double precision,
      computed_at timestamptz NOT NULL DEFAULT now(),
      PRIMARY KEY (reading_id, at)
    ) PARTITION BY RANGE (at);
    CREATE INDEX measurements_channel_at ON measurements (channel_id, at);
    CREATE TABLE measurements_default PARTITION OF measurements DEFAULT;

    CREATE OR REPLACE FUNCTION ensure_measurement_partitions(from_month date, months integer) RETURNS void AS $$
    DECLARE
      m date := date_trunc('month', from_month)::date;
      name text;
    BEGIN
      FOR i IN 0..months - 1 LOOP
        name := format('measurements_%s', to_char(m, 'YYYY_MM'));
        IF to_regclass(name) IS NULL THEN
          EXECUTE format('CREATE TABLE %I PARTITION OF measurements FOR VALUES FROM (%L) TO (%L)', name, m, (m + interval '1 month')::date);
        END IF;
        m := (m + interval '1 month')::date;
      END LOOP;
    END $$ LANGUAGE plpgsql;
    SELECT ensure_measurement_partitions((now() - interval '2 months')::date, 5);

    -- Count, sum, min and max per bucket, upserted batch by batch; sums cover status 'ok' only.
    CREATE TABLE measurement_rollups (
      asset_id uuid NOT NULL REFERENCES assets(id) ON DELETE CASCADE,
      channel_id uuid NOT NULL REFERENCES channels(id) ON DELETE CASCADE,
      bucket_s integer NOT NULL CHECK (bucket_s IN (300, 3600)),
      bucket_start timestamptz NOT NULL,
      n_all integer NOT NULL,
      n integer NOT NULL,
      distance_sum double precision, distance_min double precision, distance_max double precision,
      level_sum double precision, level_min double precision, level_max double precision,
      volume_sum double precision, volume_min double precision, volume_max double precision,
      fill_sum double precision, fill_min double precision, fill_max double precision,
      air_temp_sum double precision, air_temp_min double precision, air_temp_max double precision,
      air_temp_n integer NOT NULL DEFAULT 0,
      uncertainty_sum double precision,
      occupied_n integer NOT NULL DEFAULT 0,
      PRIMARY KEY (asset_id, bucket_s, bucket_start, channel_id)
    );
    CREATE INDEX measurement_rollups_channel ON measurement_rollups (channel_id, bucket_s, bucket_start);

    -- The worker's memory of a channel between batches (Hampel window, bay state, CUSUM, runs).
    CREATE TABLE channel_state (
      channel_id uuid PRIMARY KEY REFERENCES channels(id) ON DELETE CASCADE,
      last_at timestamptz,
      last_reading_id bigint,
      offline_since timestamptz,
      state jsonb NOT NULL DEFAULT '{}',
      updated_at timestamptz NOT NULL DEFAULT now()
    );

    CREATE TABLE health_flags (
      id bigserial PRIMARY KEY,
      channel_id uuid NOT NULL REFERENCES channels(id) ON DELETE CASCADE,
      flag text NOT NULL CHECK (flag IN ('drift', 'stuck', 'noisy', 'offline', 'crosstalk_risk', 'out_of_range', 'no_echo')),
      since timestamptz NOT NULL,
      cleared_at timestamptz,
      magnitude double precision,
      details jsonb NOT NULL DEFAULT '{}',
      updated_at timestamptz NOT NULL DEFAULT now()
    );
    -- At most one open flag of each kind per channel.
    CREATE UNIQUE INDEX health_flags_open ON health_flags (channel_id, flag) WHERE cleared_at IS NULL;
    CREATE INDEX health_flags_channel_since ON health_flags (channel_id, since);

    CREATE TABLE occupancy_sessions (
      id bigserial PRIMARY KEY,
      asset_id uuid NOT NULL REFERENCES assets(id) ON DELETE CASCADE,
      channel_id uuid NOT NULL REFERENCES channels(id) ON DELETE CASCADE,
      started_at timestamptz NOT NULL,
      ended_at timestamptz,
      duration_s double precision NOT NULL,
      UNIQUE (channel_id, started_at)
    );
    CREATE INDEX occupancy_sessions_asset ON occupancy_sessions (asset_id, started_at);

    CREATE TABLE temperature_samples (
      site_id uuid NOT NULL REFERENCES sites(id) ON DELETE CASCADE,
      at timestamptz NOT NULL,
      air_temp_c double precision NOT NULL,
      source text NOT NULL CHECK (source IN ('channel', 'import')),
      PRIMARY KEY (site_id, at, source)
    );

    CREATE TABLE manual_dips (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      asset_id uuid NOT NULL REFERENCES assets(id) ON DELETE CASCADE,
      at timestamptz NOT NULL,
      level_m double precision NOT NULL,
      by_user_id uuid REFERENCES users(id) ON DELETE SET NULL,
      note text,
      created_at timestamptz NOT NULL DEFAULT now(),
      -- Filled by the worker: the sensor's level at the dip's time and measured − dipped.
      channel_id uuid REFERENCES channels(id) ON DELETE SET NULL,
      measured_level_m double precision,
      residual_m double precision,
      evaluated_at timestamptz
    );
    CREATE INDEX manual_dips_asset_at ON manual_dips (asset_id, at);
    CREATE INDEX manual_dips_pending ON manual_dips (at) WHERE evaluated_at IS NULL;

    CREATE TABLE tank_forecasts (
      asset_id uuid PRIMARY KEY REFERENCES assets(id) ON DELETE CASCADE,
      computed_at timestamptz NOT NULL,
      window_start timestamptz NOT NULL,
      window_end timestamptz NOT NULL,
      samples integer NOT NULL,
      current_volume_l double precision,
      reorder_volume_l double precision,
      slope_l_per_day double precision,
      days_to_reorder double precision,
      days_to_empty double precision,
      reorder_at timestamptz,
      empty_at timestamptz,
      refills jsonb NOT NULL DEFAULT '[]'
    );

    CREATE TABLE recompute_requests (
      id bigserial PRIMARY KEY,
      channel_id uuid REFERENCES channels(id) ON DELETE CASCADE,
      asset_id uuid REFERENCES assets(id) ON DELETE CASCADE,
      reason text NOT NULL,
      requested_at timestamptz NOT NULL DEFAULT now(),
      started_at timestamptz,
      done_at timestamptz,
      channels_done integer NOT NULL DEFAULT 0,
      measurements integer NOT NULL DEFAULT 0,
      error text,
      CHECK (channel_id IS NOT NULL OR asset_id IS NOT NULL)
    );
    CREATE INDEX recompute_requests_pending ON recompute_requests (id) WHERE done_at IS NULL;
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`
    DROP TABLE IF EXISTS recompute_requests, tank_forecasts, manual_dips, temperature_samples, occupancy_sessions,
      health_flags, channel_state, measurement_rollups, measurements CASCADE;
    DROP FUNCTION IF EXISTS ensure_measurement_partitions(date, integer);
  `);
};
