// POST /api/portal/auth/sign-up: create a person and their organisation (as its admin); mail the confirmation link
import { allowSignInAttempt } from "@/lib/auth/throttle";
import { signUp } from "@/lib/portal/accounts";
import { handler, ok, parseBody, PortalError } from "@/lib/portal/http";
import { signUpSchema } from "@/lib/portal/schemas";

export const POST = handler(async (req) => {
  const body = await parseBody(req, signUpSchema);
  if (!(await allowSignInAttempt(body.email, req.headers.get("x-forwarded-for") ?? "local"))) throw new PortalError(429, "Too many attempts; wait a few minutes.");
  await signUp(body);
  return ok({ email: body.email }, 201);
});
