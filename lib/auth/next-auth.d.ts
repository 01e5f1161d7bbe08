import type { DefaultSession } from "next-auth";

declare module "next-auth" {
  interface Session {
    user: { id: string } & DefaultSession["user"];
  }
}

declare module "@auth/core/jwt" {
  interface JWT {
    /** The server-side session row this cookie belongs to (db/queries/users.ts). */
    sid?: string;
  }
}
