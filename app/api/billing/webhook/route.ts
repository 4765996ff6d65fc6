// POST /api/billing/webhook: the payment provider's signed events, verified by its SDK and applied once per event id
import { verifyWebhook } from "@/lib/billing/provider";
import { applyEvent } from "@/lib/billing/service";

const json = (status: number, body: unknown) => new Response(JSON.stringify(body), { status, headers: { "content-type": "application/json" } });

export async function POST(req: Request): Promise<Response> {
  const payload = await req.text();
  let event;
  try {
    event = verifyWebhook(payload, req.headers.get("stripe-signature") ?? "");
  } catch {
    return json(400, { error: "The signature does not verify." });
  }
  try {
    return json(200, { received: true, outcome: await applyEvent(event) });
  } catch (e) {
    console.error("[sumfold] webhook not applied", { id: event.id, type: event.type, error: (e as Error).message });
    // 500 makes the provider deliver again later; nothing was claimed for this event id.
    return json(500, { error: "Not applied; it will be retried." });
  }
}
