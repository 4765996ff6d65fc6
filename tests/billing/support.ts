// Shared set-up of the billing tests: the billing routes in-process, the payment provider's SDK pointed at the
// local fake (as the product configures it), the fake's hosted card page driven like a browser, and fixtures.
import { eq } from "drizzle-orm";
import Stripe from "stripe";
import { getDb } from "@/lib/db/client";
import { organizations } from "@/lib/db/schema";
import { billingAccounts } from "@/lib/db/schema-billing";
import { routeServer, type RouteModule } from "../support/route-server";
import { cookieFor, ORG } from "../portal/support";
import * as summary from "@/app/api/portal/billing/route";
import * as plan from "@/app/api/portal/billing/plan/route";
import * as paymentMethod from "@/app/api/portal/billing/payment-method/route";
import * as checkoutReturn from "@/app/api/portal/billing/checkout/return/route";
import * as invoicesRoute from "@/app/api/portal/billing/invoices/route";
import * as invoice from "@/app/api/portal/billing/invoices/[id]/route";
import * as invoicePay from "@/app/api/portal/billing/invoices/[id]/pay/route";
import * as invoicePdf from "@/app/api/portal/billing/invoices/[id]/pdf/route";
import * as contacts from "@/app/api/portal/billing/contacts/route";
import * as contact from "@/app/api/portal/billing/contacts/[id]/route";
import * as details from "@/app/api/portal/billing/details/route";
import * as webhook from "@/app/api/billing/webhook/route";

export const billingServer = () =>
  routeServer({
    "/api/portal/billing": summary as RouteModule,
    "/api/portal/billing/plan": plan as RouteModule,
    "/api/portal/billing/payment-method": paymentMethod as RouteModule,
    "/api/portal/billing/checkout/return": checkoutReturn as RouteModule,
    "/api/portal/billing/invoices": invoicesRoute as RouteModule,
    "/api/portal/billing/invoices/[id]": invoice as RouteModule,
    "/api/portal/billing/invoices/[id]/pay": invoicePay as RouteModule,
    "/api/portal/billing/invoices/[id]/pdf": invoicePdf as RouteModule,
    "/api/portal/billing/contacts": contacts as RouteModule,
    "/api/portal/billing/contacts/[id]": contact as RouteModule,
    "/api/portal/billing/details": details as RouteModule,
    "/api/billing/webhook": webhook as RouteModule,
  });

/** The real SDK against the fake, configured from the same environment the product reads. */
export const sdk = () =>
  new Stripe(process.env.STRIPE_SECRET_KEY!, { host: process.env.STRIPE_API_HOST!, port: Number(process.env.STRIPE_API_PORT), protocol: "http" });

export const fakeUrl = () => process.env.SUMFOLD_PAYMENTS_CONTROL_URL!;

export const TEST_CARDS = {
  succeeds: "4242 4242 4242 4242",
  authenticates: "4000 0025 0000 3155",
  declined: "4000 0000 0000 0002",
  failsLater: "4000 0000 0000 0341",
} as const;

export interface HostedResult {
  status: number;
  location: string | null;
  html: string;
}

async function form(url: string, fields: Record<string, string>): Promise<HostedResult> {
  const res = await fetch(url, { method: "POST", body: new URLSearchParams(fields), redirect: "manual", headers: { "content-type": "application/x-www-form-urlencoded" } });
  return { status: res.status, location: res.headers.get("location"), html: await res.text() };
}

/** Fills the hosted card page as a person would; `second` answers the authentication step when the card asks for one. */
export async function payOnHostedPage(checkoutUrl: string, card: string, second: "complete" | "fail" = "complete"): Promise<HostedResult> {
  const page = await fetch(checkoutUrl);
  if (page.status !== 200) throw new Error(`hosted page answered ${page.status}`);
  const first = await form(checkoutUrl, { name: "Test Holder", number: card, exp: "12/34", cvc: "123" });
  if (first.status === 303 && first.location && /\/authenticate$/.test(first.location)) {
    const authUrl = new URL(first.location, checkoutUrl).toString();
    const authPage = await fetch(authUrl);
    if (!/Complete authentication/.test(await authPage.text())) throw new Error("no authentication step shown");
    return form(authUrl, { result: second });
  }
  return first;
}

/** The checkout session id a success redirect carries. */
export const sessionIdOf = (location: string) => new URL(location).searchParams.get("session_id")!;

export async function accountOf(organizationId: number) {
  const [a] = await getDb().select().from(billingAccounts).where(eq(billingAccounts.organizationId, organizationId));
  return a;
}

export async function effectivePlan(organizationId: number) {
  const [o] = await getDb().select({ plan: organizations.plan }).from(organizations).where(eq(organizations.id, organizationId));
  return o.plan;
}

/** Waits until `check` returns a truthy value (webhook deliveries are asynchronous). */
export async function eventually<T>(check: () => Promise<T>, timeoutMs = 8000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await check();
    if (v || Date.now() > end) return v;
    await new Promise((r) => setTimeout(r, 100));
  }
}

export interface FakeEvent {
  id: string;
  type: string;
  created: number;
  data: { object: { id: string; customer?: string; status?: string } };
}

export async function fakeEvents(q: { type?: string; customer?: string } = {}): Promise<FakeEvent[]> {
  const p = new URLSearchParams(Object.entries(q).filter(([, v]) => v) as [string, string][]);
  return ((await (await fetch(`${fakeUrl()}/_fake/events?${p}`)).json()) as { data: FakeEvent[] }).data;
}

/** Signs a payload the way the provider signs its deliveries, with the SDK's own test helper. */
export function sign(payload: string, secret = process.env.STRIPE_WEBHOOK_SECRET!): string {
  return sdk().webhooks.generateTestHeaderString({ payload, secret });
}

/** Gives an organisation a customer and a saved card at the provider directly (a fixture shortcut past checkout). */
export async function withSavedCard(organizationId: number, testPaymentMethod = "pm_card_visa") {
  const { ensureAccount } = await import("@/lib/billing/service");
  await ensureAccount(organizationId);
  const s = sdk();
  const c = await s.customers.create({ name: `fixture ${organizationId}`, metadata: { organization_id: String(organizationId) } });
  const pm = await s.paymentMethods.attach(testPaymentMethod, { customer: c.id });
  await s.customers.update(c.id, { invoice_settings: { default_payment_method: pm.id } });
  await getDb()
    .update(billingAccounts)
    .set({ providerCustomerId: c.id, paymentMethodId: pm.id, cardBrand: pm.card!.brand, cardLast4: pm.card!.last4, cardExpMonth: pm.card!.exp_month, cardExpYear: pm.card!.exp_year })
    .where(eq(billingAccounts.organizationId, organizationId));
  return { customer: c.id, paymentMethod: pm.id };
}

/** Moves an organisation's billing period (tests use months far from today, which the server's own sweep leaves alone). */
export async function setPeriod(organizationId: number, start: string, end: string) {
  await getDb().update(billingAccounts).set({ periodStart: new Date(start), periodEnd: new Date(end) }).where(eq(billingAccounts.organizationId, organizationId));
}

/** Headers of a signed-in call acting in an organisation: the session cookie and the organisation header. */
export async function as(userId: number, organizationId: number): Promise<Record<string, string>> {
  return { cookie: await cookieFor(userId), [ORG]: String(organizationId) };
}
