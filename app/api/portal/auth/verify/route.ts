// POST /api/portal/auth/verify: spend an e-mail confirmation link
import { verifyEmail } from "@/lib/portal/accounts";
import { handler, ok, parseBody } from "@/lib/portal/http";
import { tokenSchema } from "@/lib/portal/schemas";

export const POST = handler(async (req) => ok(await verifyEmail((await parseBody(req, tokenSchema)).token)));
