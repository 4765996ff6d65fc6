import "server-only";
import Stripe from "stripe";

const g = globalThis as unknown as { __sumfoldStripe?: Stripe };

/**
 * The payment provider's server SDK. Locally STRIPE_API_HOST/PORT/PROTOCOL point it at the fake
 * (scripts/fakes/payments.ts); in production they are left unset and SUMFOLD_PAYMENTS_LIVE=1 lets the SDK use
 * its own default host. Without either, nothing is sent anywhere.
 */
export function provider(): Stripe {
  if (!g.__sumfoldStripe) {
    const key = process.env.STRIPE_SECRET_KEY;
    if (!key) throw new Error("STRIPE_SECRET_KEY is not set");
    const host = process.env.STRIPE_API_HOST;
    if (!host && process.env.SUMFOLD_PAYMENTS_LIVE !== "1") {
      throw new Error("STRIPE_API_HOST is not set (set SUMFOLD_PAYMENTS_LIVE=1 to use the provider's own host)");
    }
    g.__sumfoldStripe = new Stripe(key, {
      ...(host
        ? { host, port: Number(process.env.STRIPE_API_PORT ?? 443), protocol: (process.env.STRIPE_API_PROTOCOL ?? "https") as "http" | "https" }
        : {}),
      maxNetworkRetries: 2,
      timeout: 15_000,
      appInfo: { name: "Sumfold" },
    });
  }
  return g.__sumfoldStripe;
}

/** Verifies a webhook delivery's signature and parses it (throws on a bad or stale signature). */
export function verifyWebhook(payload: string, signature: string): Stripe.Event {
  const secret = process.env.STRIPE_WEBHOOK_SECRET;
  if (!secret) throw new Error("STRIPE_WEBHOOK_SECRET is not set");
  return provider().webhooks.constructEvent(payload, signature, secret);
}

export type { Stripe };
