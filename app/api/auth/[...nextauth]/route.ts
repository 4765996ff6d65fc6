// GET/POST /api/auth/*: next-auth v4 (credentials sign-in, JWT sessions, CSRF token, sign-out)
import NextAuth from "next-auth";
import { authOptions } from "@/lib/auth/options";

const handler = NextAuth(authOptions);
export { handler as GET, handler as POST };
