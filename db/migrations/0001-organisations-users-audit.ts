import type { Migration } from "../migrate";

export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`
    CREATE EXTENSION IF NOT EXISTS pgcrypto;

    CREATE TABLE organisations (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      name text NOT NULL,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now()
    );

    CREATE TYPE user_role AS ENUM ('admin', 'operator', 'technician', 'viewer');
    CREATE TYPE user_status AS ENUM ('invited', 'active', 'deactivated');

    CREATE TABLE users (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      organisation_id uuid NOT NULL REFERENCES organisations(id) ON DELETE CASCADE,
      email text NOT NULL,
      name text NOT NULL DEFAULT '',
      role user_role NOT NULL,
      status user_status NOT NULL DEFAULT 'invited',
      password_hash text,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now()
    );
    CREATE UNIQUE INDEX users_email_unique ON users (lower(email));
    CREATE INDEX users_organisation ON users (organisation_id);

    CREATE TABLE invites (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
      invited_by uuid REFERENCES users(id) ON DELETE SET NULL,
      expires_at timestamptz NOT NULL,
      used_at timestamptz,
      created_at timestamptz NOT NULL DEFAULT now()
    );

    CREATE TABLE sign_in_failures (
      id bigserial PRIMARY KEY,
      email text NOT NULL,
      at timestamptz NOT NULL DEFAULT now()
    );
    CREATE INDEX sign_in_failures_email_at ON sign_in_failures (lower(email), at);

    CREATE TABLE audit_log (
      id bigserial PRIMARY KEY,
      organisation_id uuid NOT NULL REFERENCES organisations(id) ON DELETE CASCADE,
      actor_user_id uuid REFERENCES users(id) ON DELETE SET NULL,
      actor_label text NOT NULL,
      action text NOT NULL,
      entity_type text NOT NULL,
      entity_id text,
      details jsonb NOT NULL DEFAULT '{}'::jsonb,
      at timestamptz NOT NULL DEFAULT now()
    );
    CREATE INDEX audit_log_org_at ON audit_log (organisation_id, at DESC);
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`
    DROP TABLE IF EXISTS audit_log, sign_in_failures, invites, users, organisations CASCADE;
    DROP TYPE IF EXISTS user_status; DROP TYPE IF EXISTS user_role;
  `);
};
