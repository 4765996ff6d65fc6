import "server-only";
import type { NextAuthOptions } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import { getUserByEmail } from "@/lib/db/portal";
import { verifyEmail } from "@/lib/portal/accounts";
import { signInSchema } from "@/lib/portal/schemas";
import { burnPasswordCheck, verifyPassword } from "./passwords";
import { allowSignInAttempt } from "./throttle";

/** Messages thrown from authorize() reach the client as `error` (next-auth v4); the sign-in form maps them. */
export const SIGN_IN_ERRORS = {
  throttled: "Throttled",
  unverified: "Unverified",
  linkUsed: "LinkUsed",
} as const;

const clientIp = (headers: Record<string, unknown> | undefined) => {
  const xff = headers?.["x-forwarded-for"];
  return (typeof xff === "string" ? xff.split(",")[0].trim() : "") || String(headers?.["x-real-ip"] ?? "local");
};

export const authOptions: NextAuthOptions = {
  secret: process.env.NEXTAUTH_SECRET,
  session: { strategy: "jwt", maxAge: 7 * 24 * 3600 },
  pages: { signIn: "/sign-in", error: "/sign-in" },
  providers: [
    CredentialsProvider({
      id: "credentials",
      name: "E-mail and password",
      credentials: { email: { label: "E-mail", type: "email" }, password: { label: "Password", type: "password" } },
      async authorize(credentials, req) {
        const parsed = signInSchema.safeParse(credentials ?? {});
        if (!parsed.success) return null;
        const { email, password } = parsed.data;
        if (!(await allowSignInAttempt(email, clientIp(req?.headers)))) throw new Error(SIGN_IN_ERRORS.throttled);
        const user = await getUserByEmail({ email });
        if (!user) return burnPasswordCheck(password).then(() => null);
        if (!(await verifyPassword(password, user.passwordHash))) return null;
        if (!user.emailVerifiedAt) throw new Error(SIGN_IN_ERRORS.unverified);
        return { id: String(user.id), email: user.email, name: user.name };
      },
    }),
    // Confirming the address from the e-mailed link (single use, 24 hours) also signs the person in: no second sign-in.
    CredentialsProvider({
      id: "email-link",
      name: "E-mail confirmation link",
      credentials: { token: { label: "Token", type: "text" } },
      async authorize(credentials) {
        const token = typeof credentials?.token === "string" ? credentials.token : "";
        if (token.length < 20 || token.length > 200) throw new Error(SIGN_IN_ERRORS.linkUsed);
        try {
          const u = await verifyEmail(token);
          return { id: String(u.userId), email: u.email, name: u.name };
        } catch {
          throw new Error(SIGN_IN_ERRORS.linkUsed);
        }
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        token.uid = Number(user.id);
        token.email = user.email;
        token.name = user.name;
      }
      return token;
    },
    async session({ session, token }) {
      session.user = { id: token.uid, email: token.email, name: token.name };
      return session;
    },
  },
};
