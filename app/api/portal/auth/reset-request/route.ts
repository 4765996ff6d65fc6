// POST /api/portal/auth/reset-request: mail a password reset link (same answer for every address)
import { allowSignInAttempt } from "@/lib/auth/throttle";
import { requestPasswordReset } from "@/lib/portal/accounts";
import { handler, ok, parseBody, PortalError } from "@/lib/portal/http";
import { emailOnlySchema } from "@/lib/portal/schemas";

export const POST = handler(async (req) => {
  const { email } = await parseBody(req, emailOnlySchema);
  if (!(await allowSignInAttempt(email, req.headers.get("x-forwarded-for") ?? "local"))) throw new PortalError(429, "Too many attempts; wait a few minutes.");
  await requestPasswordReset(email);
  return ok({ sent: true }, 202);
});
