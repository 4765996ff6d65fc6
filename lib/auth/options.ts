import "server-only";
import type { NextAuthOptions } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import { getUserByEmail } from "@/lib/db/portal";
import { verifyEmail } from "@/lib/portal/accounts";
import { signInSchema } from "@/lib/portal/schemas";
import { burnPasswordCheck, verifyPassword } from "./passwords";
import { DbUnavailableError } from "@/lib/db/client";
import { endSession, isSessionLive, openSession, SESSION_MAX_AGE_S } from "./sessions";
import { allowSignInAttempt } from "./throttle";
import { checkSecondFactor } from "./totp";

/** Messages thrown from authorize() reach the client as `error` (next-auth v4); the sign-in form maps them. */
export const SIGN_IN_ERRORS = {
  throttled: "Throttled",
  unverified: "Unverified",
  linkUsed: "LinkUsed",
  /** the password was right and the account asks for a second factor: the form shows the code field */
  twoFactorRequired: "TwoFactorRequired",
  twoFactorInvalid: "TwoFactorInvalid",
} as const;

/** Thrown from the jwt callback for an ended session; next-auth then clears the cookie and reports no session. */
const SESSION_ENDED = "SessionEnded";

const clientIp = (headers: Record<string, unknown> | undefined) => {
  const xff = headers?.["x-forwarded-for"];
  return (typeof xff === "string" ? xff.split(",")[0].trim() : "") || String(headers?.["x-real-ip"] ?? "local");
};

export const authOptions: NextAuthOptions = {
  secret: process.env.NEXTAUTH_SECRET,
  session: { strategy: "jwt", maxAge: SESSION_MAX_AGE_S },
  pages: { signIn: "/sign-in", error: "/sign-in" },
  providers: [
    CredentialsProvider({
      id: "credentials",
      name: "E-mail and password",
      credentials: {
        email: { label: "E-mail", type: "email" },
        password: { label: "Password", type: "password" },
        code: { label: "Authentication code", type: "text" },
      },
      async authorize(credentials, req) {
        const parsed = signInSchema.safeParse(credentials ?? {});
        if (!parsed.success) return null;
        const { email, password } = parsed.data;
        if (!(await allowSignInAttempt(email, clientIp(req?.headers)))) throw new Error(SIGN_IN_ERRORS.throttled);
        const user = await getUserByEmail({ email });
        if (!user) return burnPasswordCheck(password).then(() => null);
        if (!(await verifyPassword(password, user.passwordHash))) return null;
        if (!user.emailVerifiedAt) throw new Error(SIGN_IN_ERRORS.unverified);
        let method: "password" | "password+totp" | "password+recovery" = "password";
        if (user.totpEnabledAt) {
          const code = typeof credentials?.code === "string" ? credentials.code.trim() : "";
          if (!code) throw new Error(SIGN_IN_ERRORS.twoFactorRequired);
          const second = await checkSecondFactor(user, code);
          if (!second) throw new Error(SIGN_IN_ERRORS.twoFactorInvalid);
          method = second === "totp" ? "password+totp" : "password+recovery";
        }
        const ua = req?.headers?.["user-agent"];
        const { sid, sv } = await openSession({ userId: user.id, ip: clientIp(req?.headers), userAgent: typeof ua === "string" ? ua : "", method });
        return { id: String(user.id), email: user.email, name: user.name, sid, sv };
      },
    }),
    // Confirming the address from the e-mailed link (single use, 24 hours) also signs the person in: no second sign-in.
    CredentialsProvider({
      id: "email-link",
      name: "E-mail confirmation link",
      credentials: { token: { label: "Token", type: "text" } },
      async authorize(credentials, req) {
        const token = typeof credentials?.token === "string" ? credentials.token : "";
        if (token.length < 20 || token.length > 200) throw new Error(SIGN_IN_ERRORS.linkUsed);
        let u;
        try {
          u = await verifyEmail(token);
        } catch {
          throw new Error(SIGN_IN_ERRORS.linkUsed);
        }
        const ua = req?.headers?.["user-agent"];
        const { sid, sv } = await openSession({ userId: u.userId, ip: clientIp(req?.headers), userAgent: typeof ua === "string" ? ua : "", method: "email-link" });
        return { id: String(u.userId), email: u.email, name: u.name, sid, sv };
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        token.uid = Number(user.id);
        token.email = user.email;
        token.name = user.name;
        token.sid = user.sid;
        token.sv = user.sv;
        return token;
      }
      // Every later use of the token (page render, /api/auth/session) checks its session is still open.
      let live: boolean;
      try {
        live = await isSessionLive(token);
      } catch (e) {
        // The database did not answer in time: keep the token (throwing here would make next-auth clear the
        // cookie, signing people out over a database pause). Nothing is served from it meanwhile: the signed-in
        // layout and every portal handler check the session themselves and answer 503 while the database is away.
        if (e instanceof DbUnavailableError) return token;
        throw e;
      }
      if (!live) throw new Error(SESSION_ENDED);
      return token;
    },
    async session({ session, token }) {
      session.user = { id: token.uid, email: token.email, name: token.name };
      return session;
    },
  },
  events: {
    async signOut({ token }) {
      if (token && typeof token.sid === "string") await endSession(token.sid);
    },
  },
  logger: {
    error(code, metadata) {
      const err = metadata instanceof Error ? metadata : metadata?.error;
      if (code === "JWT_SESSION_ERROR" && err?.message === SESSION_ENDED) return;
      console.error(`[next-auth] ${code}`, metadata);
    },
    warn(code) {
      console.warn(`[next-auth] ${code}`);
    },
    debug() {},
  },
};
