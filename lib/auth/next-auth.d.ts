import type { Role } from "./permissions";

declare module "next-auth" {
  interface Session {
    user: { id: string; organisationId: string; role: Role; name?: string | null; email?: string | null };
  }
}

declare module "next-auth/jwt" {
  interface JWT {
    uid?: string;
    org?: string;
    role?: Role;
  }
}
