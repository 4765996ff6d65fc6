// GET /api/portal/account/sessions: the signed-in person's open sessions; DELETE: sign out the others (?all=1: every one, this one too)
import { handler, ok } from "@/lib/portal/http";
import { listSessions, requireAccount, signOutEverywhere, signOutOthers } from "@/lib/portal/account";

export const GET = handler(async (req) => {
  const a = await requireAccount(req);
  return ok({ sessions: await listSessions(a) });
});

export const DELETE = handler(async (req) => {
  const a = await requireAccount(req);
  if (new URL(req.url).searchParams.get("all") === "1") {
    await signOutEverywhere(a);
    return ok({ ended: "all" });
  }
  return ok({ ended: await signOutOthers(a) });
});
