import { getServerSession } from "next-auth";
import { redirect } from "next/navigation";
import type { User } from "../db/models";
import { sqlRows } from "../db/sql";
import type { Scope } from "../db/site-scope";
import type { Actor } from "../services/audit";
import { forbidden, unauthorized } from "../errors";
import { authOptions } from "./auth-options";
import { can, type Permission, type Role } from "./permissions";

export interface SessionUser {
  id: string;
  organisationId: string;
  role: Role;
  email: string;
  name: string;
  /** What this user may read: its organisation, for a viewer with assigned sites only those, and no staff addresses. */
  scope: Scope;
}

/**
 * The signed-in user as the database knows them now: a deactivated user or a changed role takes effect
 * on the next request, not when the session cookie expires. A token issued before the user's session
 * version was raised (sign-out, password, status or role change) no longer counts.
 */
export async function currentUser(): Promise<SessionUser | null> {
  const session = await getServerSession(authOptions);
  const id = session?.user?.id;
  if (!id) return null;
  // Every request asks this: one prepared statement, not a model look-up.
  const [user] = await sqlRows<Pick<User, "id" | "organisation_id" | "role" | "email" | "name" | "status" | "session_version" | "site_ids">>(
    `SELECT id, organisation_id, role, email, name, status, session_version, site_ids FROM users WHERE id = $1`,
    [id],
    { name: "current_user" },
  );
  if (!user || user.status !== "active" || user.session_version !== session.user.sessionVersion) return null;
  const siteIds = user.role === "viewer" ? (user.site_ids ?? null) : null;
  return {
    id: user.id,
    organisationId: user.organisation_id,
    role: user.role,
    email: user.email,
    name: user.name,
    scope: { organisationId: user.organisation_id, siteIds, staffEmails: user.role !== "viewer" },
  };
}

/** The one check every route handler and server action makes. Throws 401/403 as HttpError. */
export async function requirePermission(permission: Permission): Promise<SessionUser> {
  const user = await currentUser();
  if (!user) throw unauthorized();
  if (!can(user.role, permission)) throw forbidden();
  return user;
}

/** For server-rendered pages: redirect to sign-in when signed out; show the forbidden page otherwise. */
export async function requirePageUser(permission: Permission = "dashboard:read"): Promise<SessionUser> {
  const user = await currentUser();
  if (!user) redirect("/sign-in");
  if (!can(user.role, permission)) redirect("/forbidden");
  return user;
}

export function actorOf(user: SessionUser): Actor {
  return { organisationId: user.organisationId, userId: user.id, label: user.email };
}
