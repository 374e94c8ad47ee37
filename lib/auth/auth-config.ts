import type { NextAuthOptions } from "next-auth";
import { env } from "../env";
import { isRole, type Role } from "./permissions";
import { sameOriginRedirect } from "./redirects";

// The part of the auth set-up that is safe anywhere (proxy included): no database, no bcrypt.
export const SESSION_MAX_AGE_S = 12 * 60 * 60;

export function authSecret(): string {
  return env.authSecret;
}

export const baseAuthConfig: Omit<NextAuthOptions, "providers"> = {
  session: { strategy: "jwt", maxAge: SESSION_MAX_AGE_S },
  pages: { signIn: "/sign-in", error: "/sign-in" },
  callbacks: {
    async redirect({ url, baseUrl }) {
      return sameOriginRedirect(url, baseUrl);
    },
    async jwt({ token, user }) {
      if (user) {
        const u = user as { id: string; organisationId: string; role: Role; sessionVersion: number };
        token.uid = u.id;
        token.org = u.organisationId;
        token.role = u.role;
        token.sv = u.sessionVersion;
      }
      return token;
    },
    async session({ session, token }) {
      session.user = {
        ...session.user,
        id: String(token.uid ?? ""),
        organisationId: String(token.org ?? ""),
        role: isRole(token.role) ? token.role : "viewer",
        sessionVersion: typeof token.sv === "number" ? token.sv : -1,
      };
      return session;
    },
  },
};
