// GET /api/portal/invitations/lookup?token=: what an invitation link offers (organisation, role, whether the address has an account)
import { handler, ok, PortalError } from "@/lib/portal/http";
import { describeInvitation } from "@/lib/portal/members";

export const GET = handler(async (req) => {
  const token = new URL(req.url).searchParams.get("token") ?? "";
  if (token.length < 20 || token.length > 200) throw new PortalError(410, "This invitation link is incomplete. Open it again from the e-mail.");
  return ok(await describeInvitation(token));
});
