// GET /api/portal/members: members and open invitations of the active organisation (admins only)
import { requireCaller } from "@/lib/auth/session";
import { handler, ok } from "@/lib/portal/http";
import { listMembersAndInvitations } from "@/lib/portal/members";

export const GET = handler(async (req) => ok(await listMembersAndInvitations(await requireCaller(req, ["members.manage"]))));
