// GET /api/portal/me: the signed-in person, the organisation this page acts in and their role there (from the
// database), and every membership. With no organisation named it answers for the oldest membership, which a
// fresh page then carries in its address.
import { ROLE_PERMISSIONS } from "@/lib/auth/roles";
import { listMembershipsOfUser } from "@/lib/db/portal";
import { handler, ok } from "@/lib/portal/http";
import { callerFor } from "@/lib/portal/tenancy";

export const GET = handler(async (req) => {
  const c = await callerFor(req, { defaultToFirst: true });
  const memberships = await listMembershipsOfUser({ userId: c.userId });
  return ok({
    user: { id: c.userId, name: c.name, email: c.email, emailVerified: c.emailVerified },
    organization: { id: c.organizationId, slug: c.organizationSlug, name: c.organizationName, plan: c.plan },
    role: c.role,
    permissions: ROLE_PERMISSIONS[c.role],
    memberships: memberships.map((m) => ({ organizationId: m.organizationId, slug: m.slug, name: m.name, role: m.role })),
  });
});
