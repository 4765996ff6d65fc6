// POST /api/portal/session/organization: switch the active organisation (only to one the person belongs to)
import { ORG_COOKIE, requireCaller } from "@/lib/auth/session";
import { recordAudit } from "@/lib/db/audit";
import { getMembership } from "@/lib/db/portal";
import { handler, notFound, ok, parseBody } from "@/lib/portal/http";
import { switchOrgSchema } from "@/lib/portal/schemas";

export const POST = handler(async (req) => {
  const caller = await requireCaller(req);
  const { organizationId } = await parseBody(req, switchOrgSchema);
  const m = await getMembership({ userId: caller.userId, organizationId });
  if (!m) throw notFound("This organisation");
  await recordAudit({ organizationId, actorType: "user", actorUserId: caller.userId, action: "session.organization_switched", targetType: "organization", targetId: String(organizationId) });
  const secure = (process.env.NEXTAUTH_URL ?? "").startsWith("https://") ? "; Secure" : "";
  return ok({ organization: { id: m.organizationId, name: m.name }, role: m.role }, 200, {
    "set-cookie": `${ORG_COOKIE}=${organizationId}; Path=/; HttpOnly; SameSite=Lax; Max-Age=31536000${secure}`,
  });
});
