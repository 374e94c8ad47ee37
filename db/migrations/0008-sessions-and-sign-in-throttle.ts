import type { Migration } from "../migrate";

// Revocable sessions and sign-in throttling that holds across web instances.
//
// users.session_version is embedded in each session token and compared on every request. A trigger
// raises it whenever the role, the status or the password hash changes, so no code path that changes
// them can forget; sign-out raises it explicitly.
//
// sign_in_counters holds one row per account (lower-cased e-mail) and per client address. An attempt is
// counted before its password is checked, by one upsert whose row lock orders simultaneous attempts, so
// thirty attempts at once cannot all pass a limit of ten. sign_in_known_addresses remembers where an
// account last signed in successfully, so the per-account lock-out never locks out its owner.
export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`
    ALTER TABLE users ADD COLUMN session_version integer NOT NULL DEFAULT 1;

    CREATE FUNCTION bump_user_session_version() RETURNS trigger AS $$
    BEGIN
      IF NEW.role IS DISTINCT FROM OLD.role OR NEW.status IS DISTINCT FROM OLD.status OR NEW.password_hash IS DISTINCT FROM OLD.password_hash THEN
        NEW.session_version := OLD.session_version + 1;
      END IF;
      RETURN NEW;
    END $$ LANGUAGE plpgsql;
    CREATE TRIGGER users_bump_session_version BEFORE UPDATE ON users
      FOR EACH ROW EXECUTE FUNCTION bump_user_session_version();

    CREATE TABLE sign_in_counters (
      scope text NOT NULL CHECK (scope IN ('account', 'address')),
      key text NOT NULL,
      attempts integer NOT NULL,
      window_started_at timestamptz NOT NULL,
      last_attempt_at timestamptz NOT NULL,
      PRIMARY KEY (scope, key)
    );

    CREATE TABLE sign_in_known_addresses (
      email text NOT NULL,
      address text NOT NULL,
      last_success_at timestamptz NOT NULL,
      PRIMARY KEY (email, address)
    );

    DROP TABLE sign_in_failures;
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`
    CREATE TABLE sign_in_failures (id bigserial PRIMARY KEY, email text NOT NULL, at timestamptz NOT NULL DEFAULT now());
    CREATE INDEX sign_in_failures_email_at ON sign_in_failures (lower(email), at);
    DROP TABLE IF EXISTS sign_in_known_addresses, sign_in_counters;
    DROP TRIGGER IF EXISTS users_bump_session_version ON users;
    DROP FUNCTION IF EXISTS bump_user_session_version();
    ALTER TABLE users DROP COLUMN IF EXISTS session_version;
  `);
};
