// GET /api/portal/me: the signed-in person, their active organisation and role (from the database), and every membership
import { ROLE_PERMISSIONS } from "@/lib/auth/roles";
import { requireCaller } from "@/lib/auth/session";
import { listMembershipsOfUser } from "@/lib/db/portal";
import { handler, ok } from "@/lib/portal/http";

export const GET = handler(async (req) => {
  const c = await requireCaller(req);
  const memberships = await listMembershipsOfUser({ userId: c.userId });
  return ok({
    user: { id: c.userId, name: c.name, email: c.email, emailVerified: c.emailVerified },
    organization: { id: c.organizationId, name: c.organizationName, plan: c.plan },
    role: c.role,
    permissions: ROLE_PERMISSIONS[c.role],
    memberships: memberships.map((m) => ({ organizationId: m.organizationId, name: m.name, role: m.role })),
  });
});
