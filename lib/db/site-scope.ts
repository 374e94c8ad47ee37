// Partner scope (docs/security.md): what a signed-in user may read is its organisation, and for a
// viewer limited to chosen sites only those sites. Every read model and read service takes a `Scope`
// (never a bare organisation id), and narrows its rows with `siteScope` (SQL) or `siteScopeWhere`
// (model look-ups), so a query that forgets the site list does not compile against a session.

import { Op, type WhereOptions } from "sequelize";

export interface Scope {
  readonly organisationId: string;
  /** null: every site of the organisation; otherwise only these (possibly none). */
  readonly siteIds: readonly string[] | null;
  /** Staff see each other's e-mail addresses; a viewer (partner, customer) sees names only. */
  readonly staffEmails: boolean;
}

/** The whole organisation: in-house users, the worker, the seed. */
export function wholeOrganisation(organisationId: string): Scope {
  return { organisationId, siteIds: null, staffEmails: true };
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/**
 * A condition on a site id column, written into the statement (ids come from a uuid[] column and are
 * checked again here, so nothing else can be spliced in): TRUE, FALSE, or `column IN (…)`. It works in
 * statements with named and with positional parameters alike.
 */
export function siteScope(scope: Scope, siteIdColumn: string): string {
  if (scope.siteIds === null) return "TRUE";
  if (!scope.siteIds.length) return "FALSE";
  for (const id of scope.siteIds) if (!UUID.test(id)) throw new TypeError("a scope's site id is not a uuid");
  return `${siteIdColumn} IN (${scope.siteIds.map((id) => `'${id.toLowerCase()}'`).join(", ")})`;
}

/** The same condition for a model's `where` (organisation and site). */
export function siteScopeWhere(scope: Scope, siteIdField = "site_id"): WhereOptions {
  return {
    organisation_id: scope.organisationId,
    ...(scope.siteIds === null ? {} : { [Op.and]: [{ [siteIdField]: { [Op.in]: [...scope.siteIds] } }] }),
  };
}

/** Whether a site is inside the scope (for rows already read). */
export function siteInScope(scope: Scope, siteId: string): boolean {
  return scope.siteIds === null || scope.siteIds.includes(siteId);
}

/**
 * How a person is named to this reader: staff see the stored label (an e-mail address for people);
 * others see the person's name, and a label that is no address (the system, a device) as it is.
 */
export function personLabel(scope: Scope, label: string | null, name: string | null | undefined): string | null {
  if (scope.staffEmails || label === null) return label;
  return name?.trim() || (label.includes("@") ? "a staff member" : label);
}

const ADDRESS = /[^\s@()<>,;:"]+@[^\s@()<>,;:"]+/g;

/** A text the system wrote (an event's cause) as this reader may see it: addresses replaced for a viewer. */
export function textFor(scope: Scope, text: string): string;
export function textFor(scope: Scope, text: string | null): string | null;
export function textFor(scope: Scope, text: string | null): string | null {
  return scope.staffEmails || text === null ? text : text.replace(ADDRESS, "a staff member");
}

/** An event's details as this reader may see them: addresses left out for a viewer. */
export function detailsFor(scope: Scope, details: Record<string, unknown>): Record<string, unknown> {
  if (scope.staffEmails) return details;
  return Object.fromEntries(Object.entries(details).filter(([key]) => key !== "email" && key !== "emails"));
}
