// Display settings: the one place that resolves what a person reads figures and times in (pages,
// e-mails, exports), and the audited changes to the organisation's settings and a user's own.

import type { Transaction } from "sequelize";
import { getSequelize } from "../db/sequelize";
import { Organisation, User } from "../db/models";
import { sqlRows } from "../db/sql";
import { notFound } from "../errors";
import { exportUnitsFor, type ExportUnits } from "../format/export-units";
import type { UnitSystem } from "../units/units";
import { resolveDisplaySettings, type DisplayOverrides, type DisplaySettings } from "../format/display";
import type { DisplayPreferencesInput, OrganisationDisplaySettingsInput } from "../validations/display-settings";
import { writeAudit, type Actor } from "./audit";

export interface DisplaySettingsView {
  organisation: DisplaySettings;
  /** The user's own choices; null follows the organisation. */
  own: { [K in keyof DisplaySettings]: DisplaySettings[K] | null };
  effective: DisplaySettings;
}

interface SettingsRow {
  user_id: string;
  org_unit_system: DisplaySettings["unit_system"];
  org_decimal_separator: DisplaySettings["decimal_separator"];
  org_clock: DisplaySettings["clock"];
  unit_system: DisplaySettings["unit_system"] | null;
  decimal_separator: DisplaySettings["decimal_separator"] | null;
  clock: DisplaySettings["clock"] | null;
}

function viewOf(r: SettingsRow): DisplaySettingsView {
  const organisation: DisplaySettings = { unit_system: r.org_unit_system, decimal_separator: r.org_decimal_separator, clock: r.org_clock };
  const own = { unit_system: r.unit_system, decimal_separator: r.decimal_separator, clock: r.clock };
  return { organisation, own, effective: resolveDisplaySettings(organisation, own) };
}

const SETTINGS_OF_USERS = `
  SELECT u.id AS user_id, o.unit_system AS org_unit_system, o.decimal_separator AS org_decimal_separator, o.clock AS org_clock,
         u.unit_system, u.decimal_separator, u.clock
    FROM users u JOIN organisations o ON o.id = u.organisation_id`;

/** The organisation's settings, the user's own and what follows from both. */
export async function displaySettingsOf(organisationId: string, userId: string): Promise<DisplaySettingsView> {
  const [row] = await sqlRows<SettingsRow>(`${SETTINGS_OF_USERS} WHERE u.id = $1 AND u.organisation_id = $2`, [userId, organisationId]);
  if (!row) throw notFound("That user");
  return viewOf(row);
}

/** The settings a signed-in person reads this request's pages, exports and answers in. */
export async function requestDisplaySettings(user: { organisationId: string; id: string }): Promise<DisplaySettings> {
  return (await displaySettingsOf(user.organisationId, user.id)).effective;
}

/** The unit system an export is written in: the one asked for, else the person's own. */
export async function exportUnitsOf(user: { organisationId: string; id: string }, asked: UnitSystem | undefined): Promise<ExportUnits> {
  return exportUnitsFor(asked ?? (await requestDisplaySettings(user)).unit_system);
}

/** Effective settings of several users at once (e-mail recipients), by user id. */
export async function effectiveDisplaySettingsOfUsers(userIds: readonly string[], transaction?: Transaction): Promise<Map<string, DisplaySettings>> {
  if (userIds.length === 0) return new Map();
  const rows = await sqlRows<SettingsRow>(`${SETTINGS_OF_USERS} WHERE u.id = ANY($1::uuid[])`, [[...new Set(userIds)]], { transaction });
  return new Map(rows.map((r) => [r.user_id, viewOf(r).effective]));
}

/** What figures sent to someone who is not a user (an address on an on-call list) are written in. */
export async function organisationDisplaySettings(organisationId: string): Promise<DisplaySettings> {
  const org = await Organisation.findByPk(organisationId);
  if (!org) throw notFound("That organisation");
  return { unit_system: org.unit_system, decimal_separator: org.decimal_separator, clock: org.clock };
}

export async function updateOrganisationDisplaySettings(actor: Actor, patch: OrganisationDisplaySettingsInput): Promise<DisplaySettings> {
  return getSequelize().transaction(async (transaction) => {
    const org = await Organisation.findByPk(actor.organisationId, { transaction, lock: true });
    if (!org) throw notFound("That organisation");
    const before: DisplaySettings = { unit_system: org.unit_system, decimal_separator: org.decimal_separator, clock: org.clock };
    await org.update(patch, { transaction });
    await writeAudit(actor, "organisation.display_settings", { type: "organisation", id: org.id }, { before, after: patch }, transaction);
    return { unit_system: org.unit_system, decimal_separator: org.decimal_separator, clock: org.clock };
  });
}

/** A user's own settings; each null goes back to the organisation's. */
export async function updateOwnDisplayPreferences(actor: Actor & { userId: string }, patch: DisplayPreferencesInput): Promise<DisplaySettingsView> {
  await getSequelize().transaction(async (transaction) => {
    const user = await User.findOne({ where: { id: actor.userId, organisation_id: actor.organisationId }, transaction, lock: true });
    if (!user) throw notFound("That user");
    const before: DisplayOverrides = { unit_system: user.unit_system ?? null, decimal_separator: user.decimal_separator ?? null, clock: user.clock ?? null };
    await user.update(patch, { transaction });
    await writeAudit(actor, "user.display_preferences", { type: "user", id: user.id }, { before, after: patch }, transaction);
  });
  return displaySettingsOf(actor.organisationId, actor.userId);
}
