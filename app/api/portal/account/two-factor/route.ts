// GET /api/portal/account/two-factor: status; POST {password}: start enrolment; DELETE {password}: turn it off
import { z } from "zod";
import { handler, ok, parseBody } from "@/lib/portal/http";
import { requireAccount, startTwoFactor, stopTwoFactor, twoFactorStatus } from "@/lib/portal/account";

const passwordOnly = z.object({ password: z.string().min(1, { error: "Enter your password." }).max(200) });

export const GET = handler(async (req) => ok(await twoFactorStatus(await requireAccount(req))));

export const POST = handler(async (req) => {
  const a = await requireAccount(req);
  const { password } = await parseBody(req, passwordOnly);
  return ok(await startTwoFactor(a, password));
});

export const DELETE = handler(async (req) => {
  const a = await requireAccount(req);
  const { password } = await parseBody(req, passwordOnly);
  await stopTwoFactor(a, password);
  return ok({ enabled: false });
});
