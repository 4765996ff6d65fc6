// POST /api/portal/organizations: a signed-in person creates an organisation and becomes its admin
import { sessionUserId } from "@/lib/auth/session";
import { getUserById } from "@/lib/db/portal";
import { createOrganization } from "@/lib/portal/accounts";
import { handler, ok, parseBody, PortalError } from "@/lib/portal/http";
import { createOrgSchema } from "@/lib/portal/schemas";

export const POST = handler(async (req) => {
  // No organisation is named here: this is how a person with none gets one.
  const userId = await sessionUserId(req.headers.get("cookie"));
  if (!userId || !(await getUserById({ userId }))) throw new PortalError(401, "Sign in to continue.");
  const { name } = await parseBody(req, createOrgSchema);
  const r = await createOrganization({ userId, name });
  return ok({ organization: { id: r.organizationId, slug: r.slug, name } }, 201);
});
