import "server-only";
import NextAuth, { CredentialsSignin, type NextAuthConfig } from "next-auth";
import Credentials from "next-auth/providers/credentials";
import Nodemailer from "next-auth/providers/nodemailer";
import { DrizzleAdapter } from "@auth/drizzle-adapter";
import { z } from "zod";
import { getDatabase } from "@/db/client";
import { accounts, sessions, users, verificationTokens } from "@/db/schema";
import { countRecentFailedSignIns, findUserByEmail, recordSignInAttempt } from "@/db/queries/users";
import { verifyPassword } from "./password";
import { emailSchema } from "@/lib/schemas/account";
import { isSignInLocked, signInRateLimit } from "./rate-limit";
import { sendMail } from "@/lib/mail/transport";
import { signInLinkMail } from "@/lib/mail/messages";

export const authBasePath = "/api/v1/auth";

class InvalidCredentials extends CredentialsSignin {
  code = "invalid-credentials";
}
class TooManyAttempts extends CredentialsSignin {
  code = "too-many-attempts";
}

const credentialsSchema = z.object({ email: emailSchema, password: z.string().min(1).max(200) });

const buildConfig = (): NextAuthConfig => ({
  basePath: authBasePath,
  trustHost: true,
  // Credentials sign-in works only with JWT sessions; roles are read per workspace on every request instead.
  session: { strategy: "jwt" },
  adapter: DrizzleAdapter(getDatabase(), {
    usersTable: users,
    accountsTable: accounts,
    sessionsTable: sessions,
    verificationTokensTable: verificationTokens,
  }),
  logger: {
    // Wrong passwords and used links are expected traffic, not server errors.
    error(error) {
      if (["CredentialsSignin", "Verification", "AccessDenied"].includes((error as { type?: string }).type ?? error.name)) return;
      console.error(error);
    },
  },
  pages: { signIn: "/sign-in", verifyRequest: "/sign-in/check-email", error: "/sign-in" },
  providers: [
    Credentials({
      credentials: { email: {}, password: {} },
      async authorize(raw) {
        const parsed = credentialsSchema.safeParse(raw);
        if (!parsed.success) throw new InvalidCredentials();
        const { email, password } = parsed.data;
        const db = getDatabase();
        const since = new Date(Date.now() - signInRateLimit.windowMinutes * 60_000);
        if (isSignInLocked(await countRecentFailedSignIns(db, email, since))) throw new TooManyAttempts();
        const user = await findUserByEmail(db, email);
        const ok = !!user?.passwordHash && (await verifyPassword(password, user.passwordHash));
        await recordSignInAttempt(db, email, ok);
        if (!ok || !user) throw new InvalidCredentials();
        return { id: user.id, email: user.email, name: user.name };
      },
    }),
    Nodemailer({
      id: "email-link",
      name: "E-mail link",
      server: process.env.SMTP_URL ?? "smtp://127.0.0.1:2525",
      from: process.env.MAIL_FROM ?? "Spillway <no-reply@spillway.test>",
      maxAge: 24 * 60 * 60,
      async sendVerificationRequest({ identifier, url }) {
        await sendMail(signInLinkMail(identifier, url));
      },
    }),
  ],
  callbacks: {
    async signIn({ user, account }) {
      // Links go only to people who already have an account (via the seed or an accepted invitation).
      if (account?.provider === "email-link") {
        return !!user.email && !!(await findUserByEmail(getDatabase(), user.email));
      }
      return true;
    },
    jwt({ token, user }) {
      if (user?.id) token.sub = user.id;
      return token;
    },
    session({ session, token }) {
      if (token.sub) session.user.id = token.sub;
      return session;
    },
  },
});

// Lazy, so importing this module (e.g. during `next build`) opens no database connection.
export const { handlers, auth, signIn, signOut } = NextAuth(() => buildConfig());
