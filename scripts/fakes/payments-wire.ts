// The provider's wire format and objects as the fake keeps them: the SDK's form encoding, the error shape, the test
// cards, and the fake's saved state.
import { randomBytes } from "node:crypto";

export type Obj = Record<string, unknown> & { id: string };

export interface CardBehaviour {
  brand: string;
  /** what happens at checkout */
  checkout: "ok" | "decline" | "authenticate";
  /** what happens when the saved card is charged later */
  charge: "ok" | "decline";
}

export const TEST_CARDS: Record<string, CardBehaviour> = {
  "4242424242424242": { brand: "visa", checkout: "ok", charge: "ok" },
  "4000002500003155": { brand: "visa", checkout: "authenticate", charge: "ok" },
  "4000000000000002": { brand: "visa", checkout: "decline", charge: "decline" },
  "4000000000000341": { brand: "visa", checkout: "ok", charge: "decline" },
  "5555555555554444": { brand: "mastercard", checkout: "ok", charge: "ok" },
};
export const TEST_PM: Record<string, string> = { pm_card_visa: "4242424242424242", pm_card_chargeCustomerFail: "4000000000000341", pm_card_mastercard: "5555555555554444" };

export interface State {
  customers: Record<string, Obj>;
  sessions: Record<string, Obj>;
  setupIntents: Record<string, Obj>;
  paymentMethods: Record<string, Obj & { _number?: string }>;
  invoices: Record<string, Obj>;
  invoiceItems: Record<string, Obj>;
  events: Record<string, Obj & { _delivered?: number; _attempts?: number }>;
  eventOrder: string[];
  invoiceSeq: number;
}

export const emptyState = (): State => ({
  customers: {},
  sessions: {},
  setupIntents: {},
  paymentMethods: {},
  invoices: {},
  invoiceItems: {},
  events: {},
  eventOrder: [],
  invoiceSeq: 0,
});

export const newId = (prefix: string) => `${prefix}_${randomBytes(12).toString("base64url").replace(/[-_]/g, "x")}`;
export const now = () => Math.floor(Date.now() / 1000);

/** Parses the SDK's form encoding: `a[b][0]=x` becomes { a: { b: ["x"] } }. */
export function parseForm(body: string): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [rawKey, value] of new URLSearchParams(body)) {
    const parts = rawKey.split(/\[|\]\[|\]/).filter((p, i) => i === 0 || p !== "");
    let cur: Record<string, unknown> = out;
    parts.forEach((p, i) => {
      const key = p === "" ? String(Object.keys(cur).length) : p;
      if (i === parts.length - 1) cur[key] = value;
      else cur = (cur[key] ??= {}) as Record<string, unknown>;
    });
  }
  const arrays = (v: unknown): unknown => {
    if (!v || typeof v !== "object") return v;
    const o = v as Record<string, unknown>;
    const keys = Object.keys(o);
    if (keys.length > 0 && keys.every((k, i) => k === String(i))) return keys.map((k) => arrays(o[k]));
    return Object.fromEntries(keys.map((k) => [k, arrays(o[k])]));
  };
  return arrays(out) as Record<string, unknown>;
}

export class ApiFailure extends Error {
  constructor(
    readonly status: number,
    readonly body: Record<string, unknown>,
  ) {
    super(String(body.message));
  }
}
export const invalid = (message: string, param?: string) => new ApiFailure(400, { type: "invalid_request_error", message, ...(param ? { param } : {}) });
export const missing = (what: string, id: string) => new ApiFailure(404, { type: "invalid_request_error", code: "resource_missing", message: `No such ${what}: '${id}'` });
export const declined = (message = "Your card was declined.") => new ApiFailure(402, { type: "card_error", code: "card_declined", decline_code: "generic_decline", message });

export const int = (v: unknown, name: string): number => {
  const n = Number(v);
  if (!Number.isSafeInteger(n)) throw invalid(`Invalid integer: ${String(v)}`, name);
  return n;
};
