// POST /api/portal/auth/reset: set a new password through a reset link
import { resetPassword } from "@/lib/portal/accounts";
import { handler, ok, parseBody } from "@/lib/portal/http";
import { resetSchema } from "@/lib/portal/schemas";

export const POST = handler(async (req) => {
  const { token, password } = await parseBody(req, resetSchema);
  return ok(await resetPassword(token, password));
});
