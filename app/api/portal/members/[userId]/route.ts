// GET /api/portal/members/:userId: what removing them means (their working keys, who could take them);
// PATCH: change a member's role; DELETE {keys: "revoke"} (default) or {keys: "transfer", transferTo}: remove them (never the last admin)
import { requireCaller } from "@/lib/auth/session";
import { handler, idParam, ok, parseBody } from "@/lib/portal/http";
import { changeRole, removalPreview, removeMember } from "@/lib/portal/members";
import { removeMemberSchema, roleChangeSchema } from "@/lib/portal/schemas";

export const GET = handler(async (req, params) => {
  const caller = await requireCaller(req, ["members.manage"]);
  return ok(await removalPreview(caller, idParam(params, "userId")));
});

export const PATCH = handler(async (req, params) => {
  const caller = await requireCaller(req, ["members.manage"]);
  const userId = idParam(params, "userId");
  const { role } = await parseBody(req, roleChangeSchema);
  await changeRole(caller, userId, role);
  return ok({ userId, role });
});

export const DELETE = handler(async (req, params) => {
  const caller = await requireCaller(req, ["members.manage"]);
  const userId = idParam(params, "userId");
  const hasBody = Number(req.headers.get("content-length") ?? 0) > 0 || req.headers.has("transfer-encoding");
  const disposition = hasBody ? await parseBody(req, removeMemberSchema) : ({ keys: "revoke" } as const);
  const settled = await removeMember(caller, userId, disposition);
  return ok({ removed: true, keys: settled?.keys ?? "revoke", keyIds: settled?.keyIds ?? [], ...(settled?.transferTo ? { transferTo: settled.transferTo } : {}) });
});
