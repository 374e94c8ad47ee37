import type { Migration } from "../migrate";

// Partner scope (docs/security.md): a viewer's site_ids limits what it reads to those sites; NULL is
// every site of the organisation. An e-mail address is unique among accounts that can sign in, so an
// invite to an address another organisation already uses is stored like any other invite (the inviting
// admin learns nothing) and fails only when the invitee tries to accept it.
export const up: Migration = async ({ context }) => {
  await context.sequelize.query(`
    ALTER TABLE users ADD COLUMN site_ids uuid[];
    DROP INDEX users_email_unique;
    CREATE UNIQUE INDEX users_email_unique ON users (lower(email)) WHERE status <> 'invited';
    CREATE UNIQUE INDEX users_email_per_organisation ON users (organisation_id, lower(email));
  `);
};

export const down: Migration = async ({ context }) => {
  await context.sequelize.query(`
    DROP INDEX users_email_per_organisation;
    DROP INDEX users_email_unique;
    DELETE FROM users u WHERE u.status = 'invited' AND EXISTS (SELECT 1 FROM users o WHERE lower(o.email) = lower(u.email) AND o.id <> u.id AND o.status <> 'invited');
    CREATE UNIQUE INDEX users_email_unique ON users (lower(email));
    ALTER TABLE users DROP COLUMN site_ids;
  `);
};
