import type { Migration } from "../migrate";

// Consequential alarms and maintenance (lib/alarms/consequential.ts, maintenance.ts): the ISA-18.2 state
// is named `suppressed_by_design`; a silent device raises one `device_offline` alarm and many channels
// flagged alike one `common_cause` alarm (neither has a channel, only the latter lists members); each
// suppressed alarm keeps the key of the cause that suppresses it. Channels remember when a reading last
// ARRIVED, so an outage is judged by arrivals, not by measurement times a backfill is catching up on.
// Maintenance windows shelve or take out of service every alarm of a device or a site until an expiry.
const FLAG_KINDS = `'drift', 'stuck', 'noisy', 'offline', 'crosstalk_risk', 'out_of_range', 'no_echo'`;
const LEVEL_KINDS = `'hh', 'h', 'l', 'll', 'rate_of_change'`;

async function dropChecks(run: (sql: string) => Promise<unknown>) {
  // The checks of 0004 were unnamed: drop every CHECK of alarms, then add them again by name.
  await run(`
    DO $$ DECLARE c record; BEGIN
      FOR c IN SELECT conname FROM pg_constraint WHERE conrelid = 'alarms'::regclass AND contype = 'c' LOOP
        EXECUTE format('ALTER TABLE alarms DROP CONSTRAINT %I', c.conname);
      END LOOP;
    END $$;`);
}

export const up: Migration = async ({ context }) => {
  const run = (sql: string) => context.sequelize.query(sql);
  await dropChecks(run);
  await run(`
    UPDATE alarms SET state = 'suppressed_by_design' WHERE state = 'suppressed';
    UPDATE alarm_events SET from_state = 'suppressed_by_design' WHERE from_state = 'suppressed';
    UPDATE alarm_events SET to_state = 'suppressed_by_design' WHERE to_state = 'suppressed';
    ALTER TABLE alarms
      ADD COLUMN device_id uuid REFERENCES devices(id) ON DELETE CASCADE,
      ADD COLUMN cause_key text,
      ADD COLUMN members jsonb NOT NULL DEFAULT '[]',
      ADD CONSTRAINT alarms_kind CHECK (kind IN (${LEVEL_KINDS}, ${FLAG_KINDS}, 'device_offline', 'common_cause')),
      ADD CONSTRAINT alarms_priority CHECK (priority IN ('critical', 'high', 'medium', 'low')),
      ADD CONSTRAINT alarms_state CHECK (state IN ('normal', 'unacknowledged', 'acknowledged', 'returned_unacknowledged', 'shelved', 'suppressed_by_design', 'out_of_service')),
      ADD CONSTRAINT alarms_shelved_until CHECK ((state = 'shelved') = (shelved_until IS NOT NULL)),
      -- Level alarms belong to a tank, flag alarms to a channel, device alarms to a device, common causes to their key.
      ADD CONSTRAINT alarms_target CHECK (CASE
        WHEN kind IN (${LEVEL_KINDS}) THEN channel_id IS NULL AND asset_id IS NOT NULL
        WHEN kind IN (${FLAG_KINDS}) THEN channel_id IS NOT NULL
        WHEN kind = 'device_offline' THEN channel_id IS NULL AND device_id IS NOT NULL
        ELSE channel_id IS NULL AND cause_key IS NOT NULL END);
    UPDATE alarms al SET device_id = ch.device_id FROM channels ch WHERE ch.id = al.channel_id;
    CREATE UNIQUE INDEX alarms_device_offline ON alarms (device_id) WHERE kind = 'device_offline';
    CREATE UNIQUE INDEX alarms_common_cause ON alarms (organisation_id, cause_key) WHERE kind = 'common_cause';
    CREATE INDEX alarms_device ON alarms (device_id);

    ALTER TABLE channel_state ADD COLUMN last_received_at timestamptz;

    CREATE TABLE maintenance_windows (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      organisation_id uuid NOT NULL REFERENCES organisations(id) ON DELETE CASCADE,
      site_id uuid NOT NULL REFERENCES sites(id) ON DELETE CASCADE,
      -- Null for a window on the whole site.
      device_id uuid REFERENCES devices(id) ON DELETE CASCADE,
      mode text NOT NULL CHECK (mode IN ('shelve', 'out_of_service')),
      reason text NOT NULL,
      starts_at timestamptz NOT NULL,
      until timestamptz NOT NULL CHECK (until > starts_at),
      -- The alarms the window took out of service, returned at its end.
      members uuid[] NOT NULL DEFAULT '{}',
      ended_at timestamptz,
      created_by uuid REFERENCES users(id) ON DELETE SET NULL,
      created_at timestamptz NOT NULL DEFAULT now()
    );
    CREATE INDEX maintenance_windows_open ON maintenance_windows (until) WHERE ended_at IS NULL;
  `);
};

export const down: Migration = async ({ context }) => {
  const run = (sql: string) => context.sequelize.query(sql);
  await run(`
    DROP TABLE IF EXISTS maintenance_windows;
    ALTER TABLE channel_state DROP COLUMN IF EXISTS last_received_at;
    DELETE FROM alarms WHERE kind IN ('device_offline', 'common_cause');
  `);
  await dropChecks(run);
  await run(`
    UPDATE alarms SET state = 'suppressed' WHERE state = 'suppressed_by_design';
    ALTER TABLE alarms DROP COLUMN device_id, DROP COLUMN cause_key, DROP COLUMN members,
      ADD CHECK (kind IN (${LEVEL_KINDS}, ${FLAG_KINDS})),
      ADD CHECK (priority IN ('critical', 'high', 'medium', 'low')),
      ADD CHECK (state IN ('normal', 'unacknowledged', 'acknowledged', 'returned_unacknowledged', 'shelved', 'suppressed', 'out_of_service')),
      ADD CHECK ((channel_id IS NULL) = (kind IN (${LEVEL_KINDS}))),
      ADD CHECK ((state = 'shelved') = (shelved_until IS NOT NULL));
  `);
};
