import type { Role } from "./permissions";

declare module "next-auth" {
  interface Session {
    user: { id: string; organisationId: string; role: Role; sessionVersion: number; name?: string | null; email?: string | null };
  }
}

declare module "next-auth/jwt" {
  interface JWT {
    uid?: string;
    org?: string;
    role?: Role;
    /** users.session_version when the token was issued; a raised version ends the session. */
    sv?: number;
  }
}
