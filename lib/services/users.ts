import { Op, UniqueConstraintError } from "sequelize";
import { writeAudit, type Actor } from "./audit";
import { Invite, User } from "../db/models";
import { getSequelize } from "../db/sequelize";
import { hashPassword } from "../auth/passwords";
import { createSignedToken, verifySignedToken } from "../auth/invite-token";
import type { InviteUserInput, UpdateUserInput } from "../validations/user";
import { sqlRows } from "../db/sql";
import type { Role } from "../auth/permissions";
import { AppError, notFound, conflict } from "../errors";

export const INVITE_TTL_HOURS = 72;
const INVITE_PURPOSE = "invite";

export interface UserRow {
  id: string;
  email: string;
  name: string;
  role: Role;
  status: string;
  /** A viewer's sites (partner scope); null is every site. */
  site_ids: string[] | null;
  created_at: string;
}

function toRow(u: User): UserRow {
  return { id: u.id, email: u.email, name: u.name, role: u.role, status: u.status, site_ids: u.site_ids ?? null, created_at: new Date(u.created_at).toISOString() };
}

export async function listUsers(organisationId: string): Promise<UserRow[]> {
  const users = await User.findAll({ where: { organisation_id: organisationId }, order: [["email", "ASC"]] });
  return users.map(toRow);
}

/**
 * Creates the invited user and a single-use invite; returns the link token to e-mail. Only this
 * organisation's users are looked at: an address another organisation uses is invited like any other
 * (same answer, same work, same mail), so the answer tells nothing about other organisations; its
 * invitee learns at acceptance that the address is taken (docs/security.md, "Partner scope").
 */
export async function inviteUser(actor: Actor, input: InviteUserInput): Promise<{ user: UserRow; token: string }> {
  return getSequelize().transaction(async (transaction) => {
    const existing = await User.findOne({ where: { organisation_id: actor.organisationId, email: { [Op.iLike]: input.email } }, transaction });
    if (existing) throw conflict("A user with this e-mail already exists.");
    const user = await User.create(
      { organisation_id: actor.organisationId, email: input.email, name: input.name, role: input.role, status: "invited" },
      { transaction },
    );
    const expiresAt = new Date(Date.now() + INVITE_TTL_HOURS * 3600_000);
    const invite = await Invite.create({ user_id: user.id, invited_by: actor.userId, expires_at: expiresAt }, { transaction });
    await writeAudit(actor, "user.invite", { type: "user", id: user.id }, { email: input.email, role: input.role }, transaction);
    return { user: toRow(user), token: createSignedToken(invite.id, expiresAt, INVITE_PURPOSE) };
  });
}

/** Only a viewer can be limited to sites, and only to sites of its own organisation. */
async function assertAssignableSites(organisationId: string, role: Role, siteIds: readonly string[]) {
  if (role !== "viewer") {
    throw new AppError("invalid", "site_ids: only a viewer can be limited to sites.", { fields: { site_ids: "Only a viewer can be limited to sites." } });
  }
  if (!siteIds.length) return;
  const found = await sqlRows<{ id: string }>(`SELECT id FROM sites WHERE organisation_id = :organisationId AND id IN (:siteIds)`, { organisationId, siteIds });
  const known = new Set(found.map((s) => s.id));
  const fields = Object.fromEntries(siteIds.flatMap((siteId, i) => (known.has(siteId) ? [] : [[`site_ids.${i}`, "No such site in your organisation."]])));
  if (Object.keys(fields).length) throw new AppError("invalid", "site_ids: no such site in your organisation.", { fields });
}

export async function updateUser(actor: Actor, id: string, patch: UpdateUserInput) {
  return getSequelize().transaction(async (transaction) => {
    const user = await User.findOne({ where: { id, organisation_id: actor.organisationId }, transaction, lock: true });
    if (!user) throw notFound("That user");
    if (user.id === actor.userId && (patch.status === "deactivated" || (patch.role && patch.role !== "admin"))) {
      throw new AppError("invalid", "You cannot deactivate yourself or remove your own admin role; ask another admin.");
    }
    if (patch.status === "active" && user.status === "invited") {
      throw new AppError("invalid", "An invited user becomes active by setting a password from the invite link.");
    }
    if (patch.site_ids) await assertAssignableSites(actor.organisationId, patch.role ?? user.role, patch.site_ids);
    const before = { role: user.role, status: user.status, name: user.name, site_ids: user.site_ids ?? null };
    await user.update(patch, { transaction });
    await writeAudit(actor, "user.update", { type: "user", id }, { before, after: patch }, transaction);
    return toRow(user);
  });
}

export type InviteLookup =
  | { ok: true; inviteId: string; email: string }
  | { ok: false; reason: "malformed" | "bad_signature" | "expired" | "used" | "unknown" | "address_taken" };

export async function lookUpInvite(token: string): Promise<InviteLookup> {
  const check = verifySignedToken(token, INVITE_PURPOSE);
  if (!check.ok) return check;
  const invite = await Invite.findByPk(check.id);
  if (!invite) return { ok: false, reason: "unknown" };
  if (invite.used_at) return { ok: false, reason: "used" };
  if (invite.expires_at <= new Date()) return { ok: false, reason: "expired" };
  const user = await User.findByPk(invite.user_id);
  if (!user || user.status === "deactivated") return { ok: false, reason: "unknown" };
  return { ok: true, inviteId: invite.id, email: user.email };
}

/** Sets the password once: the invite row is locked and marked used in the same transaction. */
export async function acceptInvite(token: string, password: string): Promise<InviteLookup> {
  const found = await lookUpInvite(token);
  if (!found.ok) return found;
  const hash = await hashPassword(password);
  return acceptLockedInvite(found, hash).catch((error: unknown) => {
    if (error instanceof AddressTaken) return { ok: false, reason: "address_taken" } as const;
    throw error;
  });
}

/** Thrown inside the accepting transaction so it rolls back: the invite stays unused. */
class AddressTaken extends Error {}

async function acceptLockedInvite(found: Extract<InviteLookup, { ok: true }>, hash: string): Promise<InviteLookup> {
  return getSequelize().transaction(async (transaction) => {
    const invite = await Invite.findByPk(found.inviteId, { transaction, lock: true });
    if (!invite || invite.used_at) return { ok: false, reason: "used" } as const;
    const user = await User.findByPk(invite.user_id, { transaction, lock: true });
    if (!user) return { ok: false, reason: "unknown" } as const;
    await invite.update({ used_at: new Date() }, { transaction });
    try {
      await User.update({ password_hash: hash, status: "active" }, { where: { id: user.id }, transaction });
    } catch (error) {
      if (error instanceof UniqueConstraintError) throw new AddressTaken();
      throw error;
    }
    await writeAudit(
      { organisationId: user.organisation_id, userId: user.id, label: user.email },
      "user.accept_invite",
      { type: "user", id: user.id },
      {},
      transaction,
    );
    return found;
  });
}
