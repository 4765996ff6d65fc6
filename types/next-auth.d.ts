import type { DefaultSession } from "next-auth";

declare module "next-auth" {
  interface Session {
    user: { id: number; email: string; name: string } & Omit<DefaultSession["user"], "email" | "name">;
  }
  interface User {
    id: string;
    email: string;
    name: string;
    /** the server-side session row this sign-in opened (lib/auth/sessions.ts) */
    sid: string;
    /** users.session_version at sign-in */
    sv: number;
  }
}

declare module "next-auth/jwt" {
  interface JWT {
    /** users.id; roles and organisations are never kept in the token (they are re-read from the database). */
    uid: number;
    email: string;
    name: string;
    /** the server-side session this token belongs to; refused once it is ended */
    sid: string;
    /** users.session_version when the session began; refused once the user's version moves on */
    sv: number;
  }
}
