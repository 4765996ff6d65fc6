// POST /api/portal/account/two-factor/confirm {code}: the first code from the device turns two-factor on; answers the recovery codes once
import { z } from "zod";
import { handler, ok, parseBody } from "@/lib/portal/http";
import { finishTwoFactor, requireAccount } from "@/lib/portal/account";

const codeOnly = z.object({ code: z.string().trim().regex(/^\d{6}$/, { error: "Enter the 6-digit code your app shows." }) });

export const POST = handler(async (req) => {
  const a = await requireAccount(req);
  const { code } = await parseBody(req, codeOnly);
  return ok(await finishTwoFactor(a, code));
});
