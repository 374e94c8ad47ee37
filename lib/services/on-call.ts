// The ordered on-call list of a site: who is e-mailed first when an alarm activates, and who next
// each time the site's escalation delay passes without an acknowledgement.

import { wholeOrganisation, type Scope } from "../db/site-scope";
import { writeAudit, type Actor } from "./audit";
import { getSequelize } from "../db/sequelize";
import { AppError } from "../errors";
import { can, type Role } from "../auth/permissions";
import type { PutOnCallInput } from "../validations/on-call";
import { findSite } from "./sites";
import { sqlRows } from "../db/sql";

interface EntryRow {
  position: number;
  user_id: string;
  email: string;
  name: string;
  role: Role;
  status: string;
}

async function entries(siteId: string) {
  const found = await sqlRows<EntryRow>(
    `SELECT oc.position, u.id AS user_id, u.email, u.name, u.role, u.status
     FROM on_call_entries oc JOIN users u ON u.id = oc.user_id WHERE oc.site_id = :siteId ORDER BY oc.position`,
    { siteId },
  );
  return found.map((e) => ({ ...e, can_acknowledge: e.status === "active" && can(e.role, "alarm:acknowledge") }));
}

/** People who may be put on call: the organisation's active users whose role may acknowledge alarms. */
async function candidates(organisationId: string) {
  const users = await sqlRows<{ id: string; email: string; name: string; role: Role }>(
    `SELECT id, email, name, role FROM users WHERE organisation_id = :organisationId AND status = 'active' ORDER BY email`,
    { organisationId },
  );
  return users.filter((u) => can(u.role, "alarm:acknowledge"));
}

/** The list, and for someone who may edit it the people who could be on it. */
export async function getOnCall(scope: Scope, siteId: string, opts: { withCandidates?: boolean } = {}) {
  const site = await findSite(scope, siteId);
  const people = await entries(site.id);
  return {
    site_id: site.id,
    site_name: site.name,
    escalation_delay_min: site.escalation_delay_min,
    // A viewer (partner, customer) sees who is on call, not their addresses.
    entries: scope.staffEmails ? people : people.map((e) => ({ ...e, email: null })),
    candidates: opts.withCandidates && scope.staffEmails ? await candidates(scope.organisationId) : null,
  };
}
export type OnCallJson = Awaited<ReturnType<typeof getOnCall>>;

/** Replaces the list; everyone on it must be an active user of the organisation who may acknowledge alarms. */
export async function putOnCall(actor: Actor, siteId: string, input: PutOnCallInput) {
  await findSite(wholeOrganisation(actor.organisationId), siteId);
  const users = input.user_ids.length
    ? await sqlRows<{ id: string; email: string; role: Role; status: string }>(
        `SELECT id, email, role, status FROM users WHERE organisation_id = :organisationId AND id IN (:ids)`,
        { organisationId: actor.organisationId, ids: input.user_ids },
      )
    : [];
  const byId = new Map(users.map((u) => [u.id, u]));
  const fields: Record<string, string> = {};
  input.user_ids.forEach((id, i) => {
    const u = byId.get(id);
    if (!u) fields[`user_ids.${i}`] = "No such user in your organisation.";
    else if (u.status !== "active") fields[`user_ids.${i}`] = `${u.email} is not an active user.`;
    else if (!can(u.role, "alarm:acknowledge")) fields[`user_ids.${i}`] = `${u.email} is a ${u.role} and cannot acknowledge alarms.`;
  });
  if (Object.keys(fields).length) {
    throw new AppError("invalid", Object.entries(fields).map(([k, v]) => `${k}: ${v}`).join("; "), { fields });
  }
  await getSequelize().transaction(async (transaction) => {
    await sqlRows(`SELECT id FROM sites WHERE id = :siteId FOR UPDATE`, { siteId }, { transaction });
    await sqlRows(`DELETE FROM on_call_entries WHERE site_id = :siteId RETURNING position`, { siteId }, { transaction });
    for (const [i, userId] of input.user_ids.entries()) {
      await sqlRows(`INSERT INTO on_call_entries (site_id, position, user_id) VALUES (:siteId, :position, :userId) RETURNING position`, { siteId, position: i + 1, userId }, { transaction });
    }
    await writeAudit(actor, "on_call.update", { type: "site", id: siteId }, { emails: input.user_ids.map((id) => byId.get(id)?.email) }, transaction);
  });
  return getOnCall(wholeOrganisation(actor.organisationId), siteId, { withCandidates: true });
}
