// A local fake of the payment provider's REST API: the subset Sumfold uses, spoken the way the provider's own
// server SDK (`stripe` on npm) sends it (form-encoded bodies with bracket keys, Bearer secret key,
// Idempotency-Key replay, the provider's error shape) plus a small hosted card page for checkout and signed
// webhook deliveries (`Stripe-Signature: t=<unix>,v1=<HMAC-SHA256(secret, "<t>.<payload>")>`).
//
// Test cards on the hosted page (any future expiry, any 3-digit CVC):
//   4242 4242 4242 4242  succeeds; later charges succeed
//   4000 0025 0000 3155  needs a second step (an authentication page) before it is saved; later charges succeed
//   4000 0000 0000 0002  declined at checkout
//   4000 0000 0000 0341  saved at checkout, but every later charge is declined (the failed-payment path)
// Test payment methods that can be attached through the API: pm_card_visa (4242), pm_card_chargeCustomerFail (0341).
//
// Test-only controls under /_fake: GET /_fake/events, POST /_fake/events/:id/deliver, POST /_fake/hold {hold}.
import { createHmac, timingSafeEqual } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { createServer, type IncomingMessage, type Server, type ServerResponse } from "node:http";
import { dirname } from "node:path";
import { hostedCheckout } from "./payments-checkout";
import { ApiFailure, declined, emptyState, int, invalid, missing, newId, now, parseForm, TEST_CARDS, TEST_PM, type Obj, type State } from "./payments-wire";

export { parseForm, TEST_CARDS };

export interface PaymentsFakeOptions {
  port: number;
  secretKey: string;
  webhookSecret: string;
  /** where events are POSTed (the product's webhook route); none: events are only logged */
  webhookUrl?: string;
  /** JSON file that keeps the fake's objects across restarts (the demo copy); none: memory only */
  stateFile?: string;
}

export interface PaymentsFake {
  server: Server;
  url: string;
  close: () => Promise<void>;
}

export async function startPaymentsFake(opts: PaymentsFakeOptions): Promise<PaymentsFake> {
  const base = `http://127.0.0.1:${opts.port}`;
  let state: State = emptyState();
  if (opts.stateFile && existsSync(opts.stateFile)) {
    try {
      state = { ...emptyState(), ...JSON.parse(readFileSync(opts.stateFile, "utf8")) };
    } catch {
      state = emptyState();
    }
  }
  let saveTimer: NodeJS.Timeout | null = null;
  const save = () => {
    if (!opts.stateFile || saveTimer) return;
    saveTimer = setTimeout(() => {
      saveTimer = null;
      mkdirSync(dirname(opts.stateFile!), { recursive: true });
      writeFileSync(opts.stateFile!, JSON.stringify(state));
    }, 50);
  };
  const idempotent = new Map<string, { status: number; body: string }>();
  let hold = false;
  const timers = new Set<NodeJS.Timeout>();

  // ---- events and webhook delivery ----
  const publicView = (o: Obj) => Object.fromEntries(Object.entries(o).filter(([k]) => !k.startsWith("_")));
  function emit(type: string, object: Obj) {
    const ev: Obj = { id: newId("evt"), object: "event", api_version: "2026-10-28.endive", created: now(), livemode: false, pending_webhooks: opts.webhookUrl ? 1 : 0, type, data: { object: structuredClone(publicView(object)) }, request: { id: null, idempotency_key: null } };
    state.events[ev.id] = ev;
    state.eventOrder.push(ev.id);
    save();
    if (!hold) schedule(ev.id, 0, 0);
  }
  function schedule(id: string, delayMs: number, attempt: number) {
    const t = setTimeout(() => {
      timers.delete(t);
      void deliver(id).then((status) => {
        if ((status === 0 || status >= 500) && attempt < 4) schedule(id, 500 * 3 ** attempt, attempt + 1);
      });
    }, delayMs);
    timers.add(t);
  }
  function signatureHeader(payload: string, t = now()) {
    const v1 = createHmac("sha256", opts.webhookSecret).update(`${t}.${payload}`).digest("hex");
    return `t=${t},v1=${v1}`;
  }
  async function deliver(id: string): Promise<number> {
    const ev = state.events[id];
    if (!ev || !opts.webhookUrl) return 0;
    const payload = JSON.stringify(publicView(ev), null, 2);
    ev._attempts = (ev._attempts ?? 0) + 1;
    try {
      const r = await fetch(opts.webhookUrl, {
        method: "POST",
        headers: { "content-type": "application/json", "stripe-signature": signatureHeader(payload), "user-agent": "Sumfold-PaymentsFake/1.0" },
        body: payload,
        signal: AbortSignal.timeout(10_000),
      });
      await r.text().catch(() => "");
      if (r.ok) ev._delivered = now();
      save();
      return r.status;
    } catch {
      return 0;
    }
  }

  // ---- objects ----
  const customer = (id: string) => state.customers[id] ?? (() => { throw missing("customer", id); })();
  function makePaymentMethod(number: string, customerId: string | null, exp: { month: number; year: number }): Obj {
    const behaviour = TEST_CARDS[number];
    const pm: Obj & { _number?: string } = {
      id: newId("pm"),
      object: "payment_method",
      type: "card",
      created: now(),
      customer: customerId,
      livemode: false,
      billing_details: { name: null, email: null },
      card: { brand: behaviour?.brand ?? "visa", last4: number.slice(-4), exp_month: exp.month, exp_year: exp.year, funding: "credit", country: "GB" },
      _number: number,
    };
    state.paymentMethods[pm.id] = pm;
    return pm;
  }
  function recomputeInvoice(inv: Obj) {
    const items = Object.values(state.invoiceItems).filter((ii) => ii.invoice === inv.id);
    const total = items.reduce((s, ii) => s + Number(ii.amount), 0);
    inv.subtotal = total;
    inv.total = total;
    inv.amount_due = total;
    inv.amount_remaining = inv.status === "paid" ? 0 : total;
    inv.lines = { object: "list", has_more: false, url: `/v1/invoices/${inv.id}/lines`, data: items.map((ii) => ({ id: ii.id, object: "line_item", amount: ii.amount, currency: ii.currency, description: ii.description, quantity: ii.quantity ?? 1, metadata: ii.metadata })) };
  }
  function chargeInvoice(inv: Obj, pmId: string | null) {
    if (inv.status === "paid") return inv;
    if (inv.status !== "open") throw invalid(`Invoice ${inv.id} is ${String(inv.status)} and cannot be paid.`);
    const cust = customer(String(inv.customer));
    const pmUse = pmId ?? ((cust.invoice_settings as { default_payment_method: string | null }).default_payment_method);
    if (Number(inv.amount_due) > 0) {
      const pm = pmUse ? state.paymentMethods[pmUse] : undefined;
      inv.attempt_count = Number(inv.attempt_count ?? 0) + 1;
      inv.attempted = true;
      if (!pm) {
        save();
        emit("invoice.payment_failed", inv);
        throw new ApiFailure(402, { type: "invalid_request_error", code: "invoice_payment_intent_requires_action", message: "The customer has no payment method to charge." });
      }
      const behaviour = TEST_CARDS[pm._number ?? ""] ?? { charge: "ok" };
      if (behaviour.charge === "decline") {
        inv.last_finalization_error = null;
        inv.next_payment_attempt = null;
        save();
        emit("invoice.payment_failed", inv);
        throw declined();
      }
      inv.default_payment_method = pm.id;
    }
    inv.status = "paid";
    inv.paid = true;
    inv.amount_paid = inv.amount_due;
    inv.amount_remaining = 0;
    (inv.status_transitions as Record<string, number | null>).paid_at = now();
    save();
    emit("invoice.paid", inv);
    return inv;
  }

  // ---- API routes ----
  type Handler = (m: RegExpMatchArray, body: Record<string, unknown>, query: URLSearchParams) => Obj | Record<string, unknown>;
  const routes: [string, RegExp, Handler][] = [
    ["POST", /^\/v1\/customers$/, (_m, b) => {
      const c: Obj = { id: newId("cus"), object: "customer", created: now(), livemode: false, email: b.email ?? null, name: b.name ?? null, metadata: b.metadata ?? {}, address: b.address ?? null, invoice_settings: { default_payment_method: null } };
      state.customers[c.id] = c;
      return c;
    }],
    ["GET", /^\/v1\/customers\/([\w]+)$/, (m) => customer(m[1])],
    ["POST", /^\/v1\/customers\/([\w]+)$/, (m, b) => {
      const c = customer(m[1]);
      for (const k of ["email", "name", "address"] as const) if (k in b) c[k] = b[k] === "" ? null : b[k];
      if (b.metadata) c.metadata = { ...(c.metadata as object), ...(b.metadata as object) };
      const settings = b.invoice_settings as { default_payment_method?: string } | undefined;
      if (settings?.default_payment_method !== undefined) {
        const pm = state.paymentMethods[settings.default_payment_method];
        if (!pm || pm.customer !== c.id) throw invalid(`The payment method ${settings.default_payment_method} is not attached to ${c.id}.`, "invoice_settings[default_payment_method]");
        (c.invoice_settings as Record<string, unknown>).default_payment_method = pm.id;
      }
      return c;
    }],
    ["GET", /^\/v1\/payment_methods\/([\w]+)$/, (m) => state.paymentMethods[m[1]] ?? (() => { throw missing("payment_method", m[1]); })()],
    ["POST", /^\/v1\/payment_methods\/([\w]+)\/attach$/, (m, b) => {
      const c = customer(String(b.customer));
      const number = TEST_PM[m[1]];
      if (number) return makePaymentMethod(number, c.id, { month: 12, year: new Date().getUTCFullYear() + 3 });
      const pm = state.paymentMethods[m[1]] ?? (() => { throw missing("payment_method", m[1]); })();
      pm.customer = c.id;
      return pm;
    }],
    ["GET", /^\/v1\/setup_intents\/([\w]+)$/, (m) => state.setupIntents[m[1]] ?? (() => { throw missing("setup_intent", m[1]); })()],
    ["POST", /^\/v1\/checkout\/sessions$/, (_m, b) => {
      if (b.mode !== "setup") throw invalid("This provider stand-in supports mode=setup only.", "mode");
      if (!b.success_url || !b.cancel_url) throw invalid("success_url and cancel_url are required.");
      const c = customer(String(b.customer));
      const s: Obj = { id: newId("cs_test"), object: "checkout.session", created: now(), expires_at: now() + 86_400, livemode: false, mode: "setup", status: "open", customer: c.id, currency: b.currency ?? null, setup_intent: null, success_url: b.success_url, cancel_url: b.cancel_url, metadata: b.metadata ?? {}, client_reference_id: b.client_reference_id ?? null, url: "" };
      s.url = `${base}/pay/${s.id}`;
      state.sessions[s.id] = s;
      return s;
    }],
    ["GET", /^\/v1\/checkout\/sessions\/([\w]+)$/, (m) => state.sessions[m[1]] ?? (() => { throw missing("checkout.session", m[1]); })()],
    ["POST", /^\/v1\/invoices$/, (_m, b) => {
      const c = customer(String(b.customer));
      const inv: Obj = {
        id: newId("in"), object: "invoice", created: now(), livemode: false, customer: c.id, currency: String(b.currency ?? "gbp").toLowerCase(), status: "draft",
        collection_method: b.collection_method ?? "charge_automatically", auto_advance: b.auto_advance === "true", description: b.description ?? null, metadata: b.metadata ?? {},
        number: null, attempt_count: 0, attempted: false, paid: false, amount_paid: 0, status_transitions: { finalized_at: null, paid_at: null, voided_at: null }, default_payment_method: null,
      };
      state.invoices[inv.id] = inv;
      recomputeInvoice(inv);
      return inv;
    }],
    ["GET", /^\/v1\/invoices\/([\w]+)$/, (m) => state.invoices[m[1]] ?? (() => { throw missing("invoice", m[1]); })()],
    ["POST", /^\/v1\/invoiceitems$/, (_m, b) => {
      const c = customer(String(b.customer));
      const inv = b.invoice ? (state.invoices[String(b.invoice)] ?? (() => { throw missing("invoice", String(b.invoice)); })()) : null;
      if (inv && inv.status !== "draft") throw invalid(`Invoice ${inv.id} is no longer a draft.`, "invoice");
      const ii: Obj = { id: newId("ii"), object: "invoiceitem", customer: c.id, invoice: inv?.id ?? null, amount: int(b.amount, "amount"), currency: String(b.currency ?? "gbp").toLowerCase(), description: b.description ?? null, quantity: b.quantity ? int(b.quantity, "quantity") : 1, metadata: b.metadata ?? {}, date: now() };
      state.invoiceItems[ii.id] = ii;
      if (inv) recomputeInvoice(inv);
      return ii;
    }],
    ["POST", /^\/v1\/invoices\/([\w]+)\/finalize$/, (m) => {
      const inv = state.invoices[m[1]] ?? (() => { throw missing("invoice", m[1]); })();
      if (inv.status !== "draft") throw invalid(`Invoice ${inv.id} is already finalized.`);
      state.invoiceSeq++;
      inv.number = `PF-${String(state.invoiceSeq).padStart(5, "0")}`;
      inv.status = "open";
      (inv.status_transitions as Record<string, number | null>).finalized_at = now();
      recomputeInvoice(inv);
      emit("invoice.finalized", inv);
      return inv;
    }],
    ["POST", /^\/v1\/invoices\/([\w]+)\/pay$/, (m, b) => {
      const inv = state.invoices[m[1]] ?? (() => { throw missing("invoice", m[1]); })();
      return chargeInvoice(inv, b.payment_method ? String(b.payment_method) : null);
    }],
    ["POST", /^\/v1\/invoices\/([\w]+)\/void$/, (m) => {
      const inv = state.invoices[m[1]] ?? (() => { throw missing("invoice", m[1]); })();
      if (inv.status !== "open") throw invalid(`Invoice ${inv.id} is ${String(inv.status)} and cannot be voided.`);
      inv.status = "void";
      inv.amount_remaining = 0;
      (inv.status_transitions as Record<string, number | null>).voided_at = now();
      emit("invoice.voided", inv);
      return inv;
    }],
    ["GET", /^\/v1\/events\/([\w]+)$/, (m) => (state.events[m[1]] ? publicView(state.events[m[1]]) : (() => { throw missing("event", m[1]); })()) as Obj],
  ];

  // ---- hosted checkout page ----
  const hosted = hostedCheckout({ state, save, emit, makePaymentMethod });

  // ---- server ----
  const expectedAuth = Buffer.from(`Bearer ${opts.secretKey}`);
  const send = (res: ServerResponse, status: number, body: unknown, headers: Record<string, string> = {}) => {
    res.writeHead(status, { "content-type": "application/json", "request-id": newId("req"), ...headers });
    res.end(typeof body === "string" ? body : JSON.stringify(body));
  };
  async function readBody(req: IncomingMessage): Promise<string> {
    const chunks: Buffer[] = [];
    for await (const c of req) chunks.push(c as Buffer);
    return Buffer.concat(chunks).toString("utf8");
  }
  const server = createServer(async (req, res) => {
    try {
      const url = new URL(req.url ?? "/", base);
      const method = req.method ?? "GET";
      const text = await readBody(req);
      if (url.pathname.startsWith("/pay/")) {
        const r = hosted(method, url.pathname, new URLSearchParams(text));
        if (r.location) {
          res.writeHead(303, { location: r.location });
          res.end();
        } else {
          res.writeHead(r.status, { "content-type": "text/html; charset=utf-8" });
          res.end(r.html);
        }
        return;
      }
      if (url.pathname.startsWith("/_fake/")) {
        if (method === "GET" && url.pathname === "/_fake/events") {
          const type = url.searchParams.get("type");
          const customerId = url.searchParams.get("customer");
          const list = state.eventOrder.map((id) => state.events[id]).filter((e) => (!type || e.type === type) && (!customerId || (e.data as { object: Obj }).object.customer === customerId));
          return send(res, 200, { data: list.map((e) => ({ ...publicView(e), delivered: e._delivered ?? null, attempts: e._attempts ?? 0 })) });
        }
        const dm = /^\/_fake\/events\/([\w]+)\/deliver$/.exec(url.pathname);
        if (method === "POST" && dm) {
          if (!state.events[dm[1]]) return send(res, 404, { error: { message: "no such event" } });
          return send(res, 200, { status: await deliver(dm[1]) });
        }
        if (method === "POST" && url.pathname === "/_fake/hold") {
          hold = Boolean((text ? JSON.parse(text) : {}).hold);
          return send(res, 200, { hold });
        }
        return send(res, 404, { error: { message: "unknown control" } });
      }
      const auth = Buffer.from(req.headers.authorization ?? "");
      if (auth.length !== expectedAuth.length || !timingSafeEqual(auth, expectedAuth)) {
        return send(res, 401, { error: { type: "invalid_request_error", message: "Invalid API Key provided." } });
      }
      const idemKey = method === "POST" ? req.headers["idempotency-key"] : undefined;
      const cacheKey = typeof idemKey === "string" ? `${url.pathname}|${idemKey}` : null;
      if (cacheKey && idempotent.has(cacheKey)) {
        const hit = idempotent.get(cacheKey)!;
        return send(res, hit.status, hit.body, { "idempotent-replayed": "true" });
      }
      const route = routes.find(([mm, re]) => mm === method && re.test(url.pathname));
      let status = 200;
      let out: unknown;
      if (!route) {
        status = 404;
        out = { error: { type: "invalid_request_error", message: `Unrecognized request URL (${method}: ${url.pathname}).` } };
      } else {
        try {
          const body = method === "POST" ? parseForm(text) : {};
          out = publicView(route[2](url.pathname.match(route[1])!, body, url.searchParams) as Obj);
          save();
        } catch (e) {
          if (!(e instanceof ApiFailure)) throw e;
          status = e.status;
          out = { error: e.body };
        }
      }
      const bodyText = JSON.stringify(out);
      if (cacheKey && status !== 500) idempotent.set(cacheKey, { status, body: bodyText });
      return send(res, status, bodyText);
    } catch (e) {
      send(res, 500, { error: { type: "api_error", message: (e as Error).message } });
    }
  });
  await new Promise<void>((resolveP, reject) => {
    server.once("error", reject);
    server.listen(opts.port, "127.0.0.1", () => resolveP());
  });
  return {
    server,
    url: base,
    close: () =>
      new Promise<void>((r) => {
        for (const t of timers) clearTimeout(t);
        if (saveTimer && opts.stateFile) {
          clearTimeout(saveTimer);
          writeFileSync(opts.stateFile, JSON.stringify(state));
        }
        server.close(() => r());
        server.closeAllConnections?.();
      }),
  };
}
