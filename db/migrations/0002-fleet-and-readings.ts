import type { Migration } from "../migrate";

// Sites, assets, devices with their channels and keys, and the raw readings (partitioned by month).
export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`
    CREATE TABLE sites (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      organisation_id uuid NOT NULL REFERENCES organisations(id) ON DELETE CASCADE,
      name text NOT NULL,
      time_zone text NOT NULL DEFAULT 'UTC',
      latitude double precision,
      longitude double precision,
      air_temp_c double precision,
      humidity_pct double precision,
      temperature_channel_id uuid,
      escalation_delay_min integer NOT NULL DEFAULT 15,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now()
    );
    CREATE INDEX sites_organisation ON sites (organisation_id);

    CREATE TYPE asset_kind AS ENUM ('tank', 'bay', 'point');
    CREATE TABLE assets (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      organisation_id uuid NOT NULL REFERENCES organisations(id) ON DELETE CASCADE,
      site_id uuid NOT NULL REFERENCES sites(id) ON DELETE CASCADE,
      kind asset_kind NOT NULL,
      name text NOT NULL,
      mount_height_m double precision,
      capacity_l double precision,
      safe_fill_pct double precision,
      reorder_pct double precision,
      floor_distance_m double precision,
      occupied_below_m double precision,
      geometry jsonb,
      bay_row integer,
      bay_col integer,
      bay_level text,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now()
    );
    CREATE INDEX assets_site ON assets (site_id);
    CREATE INDEX assets_organisation ON assets (organisation_id);

    CREATE TYPE signal_profile AS ENUM ('echo', 'capture', 'pulse_coded', 'duty_coded');
    CREATE TABLE devices (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      organisation_id uuid NOT NULL REFERENCES organisations(id) ON DELETE CASCADE,
      site_id uuid NOT NULL REFERENCES sites(id) ON DELETE CASCADE,
      serial text NOT NULL,
      name text NOT NULL,
      profile signal_profile NOT NULL,
      clock_hz double precision,
      prescaler integer,
      timer_bits integer,
      us_per_mm double precision,
      zero_m double precision,
      span_m double precision,
      expected_interval_s integer NOT NULL DEFAULT 60,
      max_requests_per_min integer NOT NULL DEFAULT 120,
      firmware text,
      last_seen_at timestamptz,
      battery_v double precision,
      rssi_dbm double precision,
      rate_window_start timestamptz,
      rate_count integer NOT NULL DEFAULT 0,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now()
    );
    CREATE UNIQUE INDEX devices_org_serial ON devices (organisation_id, lower(serial));
    CREATE INDEX devices_site ON devices (site_id);

    CREATE TABLE channels (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      device_id uuid NOT NULL REFERENCES devices(id) ON DELETE CASCADE,
      index smallint NOT NULL CHECK (index BETWEEN 0 AND 7),
      asset_id uuid REFERENCES assets(id) ON DELETE SET NULL,
      min_range_m double precision NOT NULL DEFAULT 0.02,
      max_range_m double precision NOT NULL DEFAULT 4,
      face_offset_m double precision NOT NULL DEFAULT 0,
      calibration_offset_m double precision NOT NULL DEFAULT 0,
      calibration_scale double precision NOT NULL DEFAULT 1,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (device_id, index)
    );
    CREATE INDEX channels_asset ON channels (asset_id);
    ALTER TABLE sites ADD CONSTRAINT sites_temperature_channel FOREIGN KEY (temperature_channel_id) REFERENCES channels(id) ON DELETE SET NULL;

    -- Only a hash of each key is kept; the short public prefix finds the row, the hash is compared in constant time.
    CREATE TABLE device_keys (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      device_id uuid NOT NULL REFERENCES devices(id) ON DELETE CASCADE,
      prefix text NOT NULL UNIQUE,
      key_hash bytea NOT NULL,
      created_at timestamptz NOT NULL DEFAULT now(),
      revoked_at timestamptz
    );
    CREATE INDEX device_keys_device ON device_keys (device_id);

    -- (device, channel, seq) makes a resend harmless; kept apart from the time-partitioned readings
    -- because a unique key on a partitioned table must include the partition column.
    CREATE TABLE reading_keys (
      device_id uuid NOT NULL REFERENCES devices(id) ON DELETE CASCADE,
      channel smallint NOT NULL,
      seq bigint NOT NULL,
      PRIMARY KEY (device_id, channel, seq)
    );

    CREATE SEQUENCE readings_id_seq;
    CREATE TABLE readings (
      id bigint NOT NULL DEFAULT nextval('readings_id_seq'),
      device_id uuid NOT NULL,
      channel smallint NOT NULL,
      seq bigint NOT NULL,
      at timestamptz NOT NULL,
      received_at timestamptz NOT NULL DEFAULT now(),
      echo_us double precision,
      ticks bigint,
      overflows integer,
      samples_us double precision[],
      pulse_us double precision,
      high_us double precision,
      period_us double precision,
      air_temp_c double precision,
      battery_v double precision,
      rssi_dbm double precision,
      PRIMARY KEY (id, at)
    ) PARTITION BY RANGE (at);
    CREATE INDEX readings_device_channel_at ON readings (device_id, channel, at);
    CREATE TABLE readings_default PARTITION OF readings DEFAULT;

    -- Readings waiting for the worker; it claims rows here with FOR UPDATE SKIP LOCKED.
    CREATE TABLE reading_queue (
      reading_id bigint PRIMARY KEY,
      at timestamptz NOT NULL
    );

    -- Monthly partitions, created ahead by migrations and by the worker each day.
    CREATE OR REPLACE FUNCTION ensure_reading_partitions(from_month date, months integer) RETURNS void AS $$
    DECLARE
      m date := date_trunc('month', from_month)::date;
      name text;
    BEGIN
      FOR i IN 0..months - 1 LOOP
        name := format('readings_%s', to_char(m, 'YYYY_MM'));
        IF to_regclass(name) IS NULL THEN
          EXECUTE format('CREATE TABLE %I PARTITION OF readings FOR VALUES FROM (%L) TO (%L)', name, m, (m + interval '1 month')::date);
        END IF;
        m := (m + interval '1 month')::date;
      END LOOP;
    END $$ LANGUAGE plpgsql;
    SELECT ensure_reading_partitions((now() - interval '2 months')::date, 5);
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`
    DROP FUNCTION IF EXISTS ensure_reading_partitions(date, integer);
    DROP TABLE IF EXISTS reading_queue, readings, reading_keys, device_keys CASCADE;
    DROP SEQUENCE IF EXISTS readings_id_seq;
    ALTER TABLE IF EXISTS sites DROP CONSTRAINT IF EXISTS sites_temperature_channel;
    DROP TABLE IF EXISTS channels, devices, assets, sites CASCADE;
    DROP TYPE IF EXISTS signal_profile; DROP TYPE IF EXISTS asset_kind;
  `);
};
