// POST /api/portal/invitations/accept: accept an invitation (existing account by password, or a new account)
import { allowSignInAttempt } from "@/lib/auth/throttle";
import { handler, ok, parseBody, PortalError } from "@/lib/portal/http";
import { acceptInvitation } from "@/lib/portal/members";
import { acceptInvitationSchema } from "@/lib/portal/schemas";

export const POST = handler(async (req) => {
  const body = await parseBody(req, acceptInvitationSchema);
  if (!(await allowSignInAttempt(`invite:${body.token.slice(0, 16)}`, req.headers.get("x-forwarded-for") ?? "local"))) {
    throw new PortalError(429, "Too many attempts; wait a few minutes.");
  }
  return ok(await acceptInvitation(body));
});
