import type { DefaultSession } from "next-auth";

declare module "next-auth" {
  interface Session {
    user: { id: number; email: string; name: string } & Omit<DefaultSession["user"], "email" | "name">;
  }
  interface User {
    id: string;
    email: string;
    name: string;
  }
}

declare module "next-auth/jwt" {
  interface JWT {
    /** users.id; roles and organisations are never kept in the token (they are re-read from the database). */
    uid: number;
    email: string;
    name: string;
  }
}
