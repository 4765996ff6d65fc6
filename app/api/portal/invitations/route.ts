// POST /api/portal/invitations: invite someone by e-mail with a role (admins only)
import { requireCaller } from "@/lib/auth/session";
import { handler, ok, parseBody } from "@/lib/portal/http";
import { invite } from "@/lib/portal/members";
import { inviteSchema } from "@/lib/portal/schemas";

export const POST = handler(async (req) => {
  const caller = await requireCaller(req, ["members.manage"]);
  return ok(await invite(caller, await parseBody(req, inviteSchema)), 201);
});
