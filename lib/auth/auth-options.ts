import type { NextAuthOptions } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import { Op } from "sequelize";
import { User } from "../db/models";
import { sqlRun } from "../db/sql";
import { signInSchema } from "../validations/user";
import { env } from "../env";
import { baseAuthConfig } from "./auth-config";
import { verifyPassword } from "./passwords";
import { clientAddress, recordSignInSuccess } from "./sign-in-throttle";

// The full provider set-up: reads users from the database and checks password hashes (server only).
// The attempt was already counted by the sign-in route (claimSignInAttempt); a success takes it back.
export const authOptions: NextAuthOptions = {
  ...baseAuthConfig,
  // Read when next-auth needs it, not when this module loads (a build reads no settings).
  get secret() {
    return env.authSecret;
  },
  providers: [
    CredentialsProvider({
      name: "E-mail and password",
      credentials: { email: { label: "E-mail", type: "email" }, password: { label: "Password", type: "password" } },
      async authorize(credentials, req) {
        const parsed = signInSchema.safeParse(credentials ?? {});
        if (!parsed.success) return null;
        const { email, password } = parsed.data;
        // An invite to an address another organisation uses is an invited row beside the account (0014).
        const user = await User.scope("withPassword").findOne({ where: { email, status: { [Op.ne]: "invited" } } });
        const ok = await verifyPassword(password, user?.password_hash);
        if (!user || !ok || user.status !== "active") return null;
        await recordSignInSuccess(email, clientAddress(new Headers((req?.headers ?? {}) as Record<string, string>)));
        return { id: user.id, email: user.email, name: user.name, organisationId: user.organisation_id, role: user.role, sessionVersion: user.session_version };
      },
    }),
  ],
  events: {
    // Signing out ends every session of the user, a copied token included (the version no longer matches).
    async signOut({ token }) {
      if (!token?.uid) return;
      await sqlRun(`UPDATE users SET session_version = session_version + 1 WHERE id = :id`, { id: token.uid });
    },
  },
};
