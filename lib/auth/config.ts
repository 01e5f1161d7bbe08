import "server-only";
import NextAuth, { CredentialsSignin, type NextAuthConfig } from "next-auth";
import Credentials from "next-auth/providers/credentials";
import Nodemailer from "next-auth/providers/nodemailer";
import { DrizzleAdapter } from "@auth/drizzle-adapter";
import { getDatabase } from "@/db/client";
import { accounts, sessions, users, verificationTokens } from "@/db/schema";
import { createSession, endSession, findUserByEmail, isSessionActive } from "@/db/queries/users";
import { signInSchema } from "@/lib/schemas/account";
import { signInLimits } from "@/lib/schemas/sign-in-limits";
import { sendMail } from "@/lib/mail/transport";
import { signInLinkMail } from "@/lib/mail/messages";
import { mailConfig, servedOverHttps, trustProxy } from "@/lib/config";
import { clientAddress } from "./client-address";
import { verifyCredentials } from "./credentials";

export const authBasePath = "/api/v1/auth";

/** How long a browser session lasts; the server-side row expires with it. */
const sessionMaxAgeSeconds = 14 * 24 * 60 * 60;

class InvalidCredentials extends CredentialsSignin {
  code = "invalid-credentials";
}
class TooManyAttempts extends CredentialsSignin {
  code = "too-many-attempts";
}

const buildConfig = (): NextAuthConfig => ({
  basePath: authBasePath,
  trustHost: true,
  // Credentials sign-in works only with JWT sessions; each JWT names a server-side session row that sign-out
  // deletes, and roles are read per workspace on every request.
  session: { strategy: "jwt", maxAge: sessionMaxAgeSeconds },
  useSecureCookies: servedOverHttps(),
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
      async authorize(raw, request) {
        const parsed = signInSchema.safeParse(raw);
        if (!parsed.success) throw new InvalidCredentials();
        const client = clientAddress(request.headers.get("x-forwarded-for"), trustProxy());
        const outcome = await verifyCredentials(getDatabase(), { ...parsed.data, client });
        if (outcome.ok) return outcome.user;
        throw outcome.reason === "too-many-attempts" ? new TooManyAttempts() : new InvalidCredentials();
      },
    }),
    Nodemailer({
      id: "email-link",
      name: "E-mail link",
      server: mailConfig.smtpUrl() ?? "smtp://127.0.0.1:2525",
      from: mailConfig.from(),
      maxAge: signInLimits.linkMaxAgeHours * 60 * 60,
      sendVerificationRequest({ identifier, url }) {
        // Not awaited: the answer must not take longer for addresses that have an account.
        sendMail(signInLinkMail(identifier, url)).catch((error) => console.error(`sign-in link to ${identifier} not sent:`, error));
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
    async jwt({ token, user }) {
      const db = getDatabase();
      if (user?.id) {
        const sessionId = crypto.randomUUID();
        await createSession(db, { userId: user.id, sessionId, expires: new Date(Date.now() + sessionMaxAgeSeconds * 1000) });
        return { ...token, sub: user.id, sid: sessionId };
      }
      // A cookie whose session row is gone (signed out, removed from the last workspace) signs nobody in.
      if (!token.sub || !token.sid || !(await isSessionActive(db, { userId: token.sub, sessionId: token.sid }))) return null;
      return token;
    },
    session({ session, token }) {
      if (token.sub) session.user.id = token.sub;
      return session;
    },
  },
  events: {
    async signOut(message) {
      const sid = "token" in message ? message.token?.sid : undefined;
      if (sid) await endSession(getDatabase(), sid);
    },
  },
});

// Lazy, so importing this module (e.g. during `next build`) opens no database connection.
export const { handlers, auth, signIn, signOut } = NextAuth(() => buildConfig());
