import type { Migration } from "../migrate";

// Alarms: level setpoints and the rate-of-change limit per tank, the alarms themselves (one row per
// asset + setpoint or channel + health flag, holding the ISA-18.2 state snapshot and the resumable
// condition state), every change as an alarm event, the ordered on-call list per site, and the
// notifications whose signed links acknowledge an alarm once.
export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`
    CREATE TABLE alarm_setpoints (
      asset_id uuid NOT NULL REFERENCES assets(id) ON DELETE CASCADE,
      key text NOT NULL CHECK (key IN ('hh', 'h', 'l', 'll')),
      -- Always metres of level; entered_* keeps what the editor typed (a fill % is converted).
      value_m double precision NOT NULL,
      entered_unit text NOT NULL DEFAULT 'm' CHECK (entered_unit IN ('m', 'pct')),
      entered_value double precision NOT NULL,
      deadband_m double precision NOT NULL CHECK (deadband_m >= 0),
      on_delay_s integer NOT NULL CHECK (on_delay_s >= 0),
      priority text NOT NULL CHECK (priority IN ('critical', 'high', 'medium', 'low')),
      enabled boolean NOT NULL DEFAULT true,
      latching boolean NOT NULL DEFAULT false,
      updated_at timestamptz NOT NULL DEFAULT now(),
      PRIMARY KEY (asset_id, key)
    );

    -- One row per tank with alarms: the rate-of-change limit and how far its measurements were evaluated.
    CREATE TABLE asset_alarm_settings (
      asset_id uuid PRIMARY KEY REFERENCES assets(id) ON DELETE CASCADE,
      organisation_id uuid NOT NULL REFERENCES organisations(id) ON DELETE CASCADE,
      roc_limit_m_per_h double precision CHECK (roc_limit_m_per_h > 0),
      roc_priority text NOT NULL DEFAULT 'high' CHECK (roc_priority IN ('critical', 'high', 'medium', 'low')),
      roc_enabled boolean NOT NULL DEFAULT false,
      evaluated_until timestamptz,
      updated_at timestamptz NOT NULL DEFAULT now()
    );

    CREATE TABLE alarms (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      organisation_id uuid NOT NULL REFERENCES organisations(id) ON DELETE CASCADE,
      site_id uuid NOT NULL REFERENCES sites(id) ON DELETE CASCADE,
      asset_id uuid REFERENCES assets(id) ON DELETE CASCADE,
      -- Set for health-flag alarms (one per channel and flag), null for the asset's level alarms.
      channel_id uuid REFERENCES channels(id) ON DELETE CASCADE,
      kind text NOT NULL CHECK (kind IN ('hh', 'h', 'l', 'll', 'rate_of_change', 'drift', 'stuck', 'noisy', 'offline', 'crosstalk_risk', 'out_of_range', 'no_echo')),
      priority text NOT NULL CHECK (priority IN ('critical', 'high', 'medium', 'low')),
      latching boolean NOT NULL DEFAULT false,
      state text NOT NULL DEFAULT 'normal' CHECK (state IN ('normal', 'unacknowledged', 'acknowledged', 'returned_unacknowledged', 'shelved', 'suppressed', 'out_of_service')),
      condition_active boolean NOT NULL DEFAULT false,
      shelved_until timestamptz,
      shelve_reason text,
      out_of_service_reason text,
      -- An episode begins each time the alarm newly needs someone's attention; notifications belong to one.
      episode integer NOT NULL DEFAULT 0,
      activations integer NOT NULL DEFAULT 0,
      activated_at timestamptz,
      cleared_at timestamptz,
      acknowledged_at timestamptz,
      acknowledged_by uuid REFERENCES users(id) ON DELETE SET NULL,
      value double precision,
      setpoint double precision,
      unit text,
      -- The condition evaluator's memory (setpoint on-delay, rate-of-change clock) and how far it got.
      eval_state jsonb NOT NULL DEFAULT '{}',
      evaluated_until timestamptz,
      last_change_at timestamptz,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      CHECK ((channel_id IS NULL) = (kind IN ('hh', 'h', 'l', 'll', 'rate_of_change'))),
      CHECK ((state = 'shelved') = (shelved_until IS NOT NULL))
    );
    CREATE UNIQUE INDEX alarms_asset_kind ON alarms (asset_id, kind) WHERE channel_id IS NULL;
    CREATE UNIQUE INDEX alarms_channel_kind ON alarms (channel_id, kind) WHERE channel_id IS NOT NULL;
    CREATE INDEX alarms_organisation_state ON alarms (organisation_id, state);
    CREATE INDEX alarms_shelved ON alarms (shelved_until) WHERE state = 'shelved';

    CREATE TABLE alarm_events (
      id bigserial PRIMARY KEY,
      alarm_id uuid NOT NULL REFERENCES alarms(id) ON DELETE CASCADE,
      organisation_id uuid NOT NULL REFERENCES organisations(id) ON DELETE CASCADE,
      -- When it happened: the measurement's time for a condition, the request's time for an action.
      at timestamptz NOT NULL,
      kind text NOT NULL,
      from_state text,
      to_state text,
      cause text NOT NULL,
      value double precision,
      setpoint double precision,
      priority text,
      episode integer,
      user_id uuid REFERENCES users(id) ON DELETE SET NULL,
      actor_label text,
      comment text,
      details jsonb NOT NULL DEFAULT '{}',
      recorded_at timestamptz NOT NULL DEFAULT now()
    );
    CREATE INDEX alarm_events_alarm_at ON alarm_events (alarm_id, at, id);
    CREATE INDEX alarm_events_organisation_kind_at ON alarm_events (organisation_id, kind, at);

    CREATE TABLE on_call_entries (
      site_id uuid NOT NULL REFERENCES sites(id) ON DELETE CASCADE,
      position integer NOT NULL CHECK (position >= 1),
      user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
      PRIMARY KEY (site_id, position),
      UNIQUE (site_id, user_id)
    );

    -- One row per alarm episode and recipient: the unique key makes "one e-mail per activation and
    -- recipient" hold across worker restarts; used_at makes the acknowledge link single-use.
    CREATE TABLE alarm_notifications (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      organisation_id uuid NOT NULL REFERENCES organisations(id) ON DELETE CASCADE,
      alarm_id uuid NOT NULL REFERENCES alarms(id) ON DELETE CASCADE,
      episode integer NOT NULL,
      user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
      email text NOT NULL,
      position integer NOT NULL,
      reason text NOT NULL CHECK (reason IN ('activation', 'escalation')),
      mail_id uuid,
      attempts integer NOT NULL DEFAULT 0,
      sent_at timestamptz,
      send_error text,
      expires_at timestamptz NOT NULL,
      used_at timestamptz,
      created_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (alarm_id, episode, user_id)
    );
    CREATE INDEX alarm_notifications_unsent ON alarm_notifications (created_at) WHERE sent_at IS NULL;

    -- Where the alarm stage got to in tables it follows (health_flags).
    CREATE TABLE alarm_stage_cursors (
      name text PRIMARY KEY,
      at timestamptz NOT NULL
    );
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`
    DROP TABLE IF EXISTS alarm_stage_cursors, alarm_notifications, on_call_entries, alarm_events, alarms,
      asset_alarm_settings, alarm_setpoints CASCADE;
  `);
};
