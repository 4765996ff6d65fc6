// The provider's hosted checkout page in the fake: a card form, the second step some test cards ask for, and the
// completed session (a saved card and a checkout.session.completed event).
import { escapeHtml as esc } from "../../lib/html";
import { newId, now, TEST_CARDS, type Obj, type State } from "./payments-wire";

export interface CheckoutDeps {
  state: State;
  save: () => void;
  emit: (type: string, object: Obj) => void;
  makePaymentMethod: (number: string, customerId: string | null, exp: { month: number; year: number }) => Obj;
}

export type HostedAnswer = { status: number; html?: string; location?: string };

/** The hosted pages under /pay/:session; returns the handler for (method, path, form). */
export function hostedCheckout({ state, save, emit, makePaymentMethod }: CheckoutDeps): (method: string, path: string, form: URLSearchParams) => HostedAnswer {
  function page(title: string, body: string, status = 200): [number, string] {
    return [
      status,
      `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>${esc(title)}</title><meta name="viewport" content="width=device-width">
  <style>body{font-family:system-ui,sans-serif;background:#f4f1ea;color:#17202e;display:flex;justify-content:center;padding:48px 16px}
  main{background:#fff;border:1px solid #d9d3c7;border-radius:10px;padding:28px;max-width:380px;width:100%}h1{font-size:20px;margin:0 0 4px}
  p.sub{color:#6b7787;margin:0 0 20px;font-size:14px}label{display:block;font-size:13px;margin:12px 0 4px}input{width:100%;box-sizing:border-box;padding:8px;border:1px solid #b9b2a5;border-radius:6px;font-size:15px}
  button{margin-top:18px;width:100%;padding:10px;border:0;border-radius:6px;background:#147063;color:#fff;font-size:15px;cursor:pointer}button.alt{background:#8a3b2e}
  .err{background:#fbe9e6;border:1px solid #e0a99f;color:#7a2418;padding:8px 10px;border-radius:6px;font-size:14px}.row{display:flex;gap:10px}.row>div{flex:1}a{color:#147063;font-size:14px}
  .note{font-size:12px;color:#6b7787;margin-top:16px}</style></head><body><main>${body}</main></body></html>`,
    ];
  }
  function cardForm(s: Obj, error?: string): [number, string] {
    const c = state.customers[String(s.customer)];
    return page(
      "Save a card",
      `<h1>Save a card</h1><p class="sub">Payment provider test mode${c?.name ? ` · ${esc(String(c.name))}` : ""}</p>
  ${error ? `<p class="err" role="alert">${esc(error)}</p>` : ""}
  <form method="post" action="/pay/${esc(s.id)}">
  <label for="name">Name on card</label><input id="name" name="name" autocomplete="cc-name" required>
  <label for="number">Card number</label><input id="number" name="number" inputmode="numeric" autocomplete="cc-number" required>
  <div class="row"><div><label for="exp">Expiry (MM/YY)</label><input id="exp" name="exp" placeholder="12/30" required></div>
  <div><label for="cvc">CVC</label><input id="cvc" name="cvc" inputmode="numeric" required></div></div>
  <button type="submit">Save card</button></form>
  <p><a href="${esc(String(s.cancel_url))}">Cancel and go back</a></p>
  <p class="note">Test mode: 4242 4242 4242 4242 succeeds; 4000 0025 0000 3155 asks for a second step; 4000 0000 0000 0002 is declined; 4000 0000 0000 0341 saves but later charges fail.</p>`,
      error ? 402 : 200,
    );
  }
  function completeSession(s: Obj, number: string, exp: { month: number; year: number }, name: string): string {
    const pm = makePaymentMethod(number, String(s.customer), exp);
    (pm.billing_details as Record<string, unknown>).name = name || null;
    const si: Obj = { id: newId("seti"), object: "setup_intent", created: now(), customer: s.customer, payment_method: pm.id, status: "succeeded", usage: "off_session", metadata: s.metadata };
    state.setupIntents[si.id] = si;
    s.setup_intent = si.id;
    s.status = "complete";
    delete s._pending;
    save();
    emit("checkout.session.completed", s);
    return String(s.success_url).replace("{CHECKOUT_SESSION_ID}", s.id);
  }
  function hosted(method: string, path: string, form: URLSearchParams): { status: number; html?: string; location?: string } {
    const m = /^\/pay\/([\w]+)(\/authenticate)?$/.exec(path);
    const s = m ? state.sessions[m[1]] : undefined;
    if (!s) return { status: 404, html: page("Not found", "<h1>This checkout does not exist.</h1>", 404)[1] };
    if (s.status !== "open") return { status: 410, html: page("Checkout ended", `<h1>This checkout has ended.</h1><p><a href="${esc(String(s.success_url).replace("{CHECKOUT_SESSION_ID}", s.id))}">Return to the site</a></p>`, 410)[1] };
    if (m![2]) {
      const pending = s._pending as { number: string; exp: { month: number; year: number }; name: string } | undefined;
      if (!pending) return { status: 303, location: `/pay/${s.id}` };
      if (method === "GET") {
        const [st, html] = page("Confirm this card", `<h1>Confirm this card</h1><p class="sub">Your bank asks you to confirm the card ending ${esc(pending.number.slice(-4))}.</p>
  <form method="post"><button name="result" value="complete" type="submit">Complete authentication</button><button class="alt" name="result" value="fail" type="submit">Fail authentication</button></form>`);
        return { status: st, html };
      }
      if (form.get("result") === "complete") return { status: 303, location: completeSession(s, pending.number, pending.exp, pending.name) };
      delete s._pending;
      save();
      const [st, html] = cardForm(s, "The card could not be confirmed. Try again or use another card.");
      return { status: st, html };
    }
    if (method === "GET") {
      const [st, html] = cardForm(s);
      return { status: st, html };
    }
    const number = (form.get("number") ?? "").replace(/[\s-]/g, "");
    const expM = /^(\d{1,2})\s*\/\s*(\d{2}|\d{4})$/.exec((form.get("exp") ?? "").trim());
    const cvc = (form.get("cvc") ?? "").trim();
    const fail = (msg: string) => {
      const [st, html] = cardForm(s, msg);
      return { status: st, html };
    };
    if (!/^\d{12,19}$/.test(number)) return fail("Enter the card number (digits only).");
    if (!expM) return fail("Enter the expiry as MM/YY.");
    const exp = { month: Number(expM[1]), year: expM[2].length === 2 ? 2000 + Number(expM[2]) : Number(expM[2]) };
    const d = new Date();
    if (exp.month < 1 || exp.month > 12 || exp.year < d.getUTCFullYear() || (exp.year === d.getUTCFullYear() && exp.month < d.getUTCMonth() + 1)) return fail("The expiry date is in the past or invalid.");
    if (!/^\d{3,4}$/.test(cvc)) return fail("Enter the 3- or 4-digit security code.");
    const behaviour = TEST_CARDS[number];
    if (!behaviour) return fail("Use one of the test cards listed below.");
    if (behaviour.checkout === "decline") return fail("Your card was declined. Try another card.");
    if (behaviour.checkout === "authenticate") {
      s._pending = { number, exp, name: form.get("name") ?? "" };
      save();
      return { status: 303, location: `/pay/${s.id}/authenticate` };
    }
    return { status: 303, location: completeSession(s, number, exp, form.get("name") ?? "") };
  }
  return hosted;
}
