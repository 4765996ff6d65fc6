// GET /api/portal/billing/checkout/return?session_id=: where the hosted checkout sends the browser back; applies the checkout and redirects to /billing
import { requireCaller } from "@/lib/auth/session";
import { completeCheckout } from "@/lib/billing/service";
import { handler, PortalError } from "@/lib/portal/http";
import { baseUrl } from "@/lib/portal/tokens";

export const GET = handler(async (req) => {
  const caller = await requireCaller(req, ["billing.manage"]);
  const sessionId = new URL(req.url).searchParams.get("session_id") ?? "";
  if (!/^cs_[\w]+$/.test(sessionId)) throw new PortalError(404, "This checkout does not exist in this organisation.");
  const out = await completeCheckout(sessionId, { organizationId: caller.organizationId });
  const result =
    out.status === "plan" ? out.action : out.status === "already" ? (out.purpose === "plan" ? (out.planInForce ? "upgraded" : "already") : "card_saved") : out.status;
  return new Response(null, { status: 303, headers: { location: `${baseUrl()}/billing?org=${encodeURIComponent(caller.organizationSlug)}&checkout=${encodeURIComponent(result)}`, "cache-control": "no-store" } });
});
