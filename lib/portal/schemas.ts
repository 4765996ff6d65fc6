import { z } from "zod";
import { GRACE_PERIODS } from "@/lib/api/key-state";
import { canonicalCidr, MAX_CIDRS } from "@/lib/api/cidr";
import { ALL_SCOPES } from "@/lib/api/scopes";
import type { Role } from "@/lib/db/schema";

// The portal's form and request schemas, shared by the browser (form validation) and the handlers.

// Spelled out (not imported from the Drizzle schema) so the browser bundle stays free of the ORM; the
// `satisfies` keeps the list equal to the database enum's type.
const ROLES = ["admin", "developer", "billing"] as const satisfies readonly Role[];

const email = z.string().trim().toLowerCase().pipe(z.email({ error: "Enter an e-mail address like name@company.com." }));
export const password = z
  .string()
  .min(10, { error: "Use at least 10 characters." })
  .max(200, { error: "Use at most 200 characters." });
const name = z.string().trim().min(1, { error: "Enter your name." }).max(160, { error: "Use at most 160 characters." });

export const signInSchema = z.object({ email, password: z.string().min(1, { error: "Enter your password." }).max(200) });

export const signUpSchema = z.object({
  name,
  email,
  password,
  organization: z.string().trim().min(2, { error: "Name your organisation (2 characters or more)." }).max(160, { error: "Use at most 160 characters." }),
});

export const emailOnlySchema = z.object({ email });
export const tokenSchema = z.object({ token: z.string().min(20).max(200) });
export const resetSchema = z.object({ token: z.string().min(20).max(200), password });

export const createOrgSchema = z.object({
  name: z.string().trim().min(2, { error: "Name your organisation (2 characters or more)." }).max(160, { error: "Use at most 160 characters." }),
});

/** Client address ranges a key is limited to: CIDR or single addresses, IPv4 or IPv6; empty means any address. */
export const cidrListSchema = z
  .array(z.string().trim().max(64))
  .max(MAX_CIDRS, { error: `At most ${MAX_CIDRS} ranges per key.` })
  .transform((list, ctx) => {
    const out: string[] = [];
    for (const item of list.filter(Boolean)) {
      const c = canonicalCidr(item);
      if (!c) ctx.addIssue({ code: "custom", message: `“${item}” is not an address range: write it like 203.0.113.0/24, 2001:db8::/48 or a single address.` });
      else if (!out.includes(c)) out.push(c);
    }
    return out;
  });

export const keyCreateSchema = z.object({
  label: z.string().trim().min(1, { error: "Give the key a label, e.g. “pricing batch job”." }).max(120, { error: "Use at most 120 characters." }),
  /** Every scope is read-only; a key made without a choice gets them all (the docs' first call then works). */
  scopes: z
    .array(z.enum(ALL_SCOPES as [string, ...string[]]))
    .min(1, { error: "Pick at least one endpoint group." })
    .default([...ALL_SCOPES]),
  /** ISO date (YYYY-MM-DD) or empty for no expiry; must lie in the future. */
  expiresOn: z
    .string()
    .trim()
    .optional()
    .refine((s) => !s || /^\d{4}-\d{2}-\d{2}$/.test(s), { error: "Use a date like 2027-03-31." })
    .refine((s) => !s || !/^\d{4}-\d{2}-\d{2}$/.test(s) || isCalendarDay(s), { error: "That day does not exist in the calendar: use a date like 2027-03-31." })
    .refine((s) => !s || new Date(`${s}T23:59:59.999Z`) > new Date(), { error: "Pick a date after today." }),
  allowedCidrs: cidrListSchema.optional(),
});
export type KeyCreateInput = z.infer<typeof keyCreateSchema>;

/** Splits what a person typed (commas, spaces or new lines between ranges) into a list. */
export const splitCidrs = (text: string) => text.split(/[\s,;]+/).map((s) => s.trim()).filter(Boolean);

export const keyUpdateSchema = z
  .object({
    label: keyCreateSchema.shape.label.optional(),
    scopes: z.array(z.enum(ALL_SCOPES as [string, ...string[]])).min(1, { error: "Pick at least one endpoint group." }).optional(),
    allowedCidrs: cidrListSchema.optional(),
  })
  .refine((v) => v.label !== undefined || v.scopes !== undefined || v.allowedCidrs !== undefined, { error: "Change the label, the endpoint groups or the address ranges." });
export type KeyUpdateInput = z.infer<typeof keyUpdateSchema>;

export const GRACE_CHOICES = Object.keys(GRACE_PERIODS) as (keyof typeof GRACE_PERIODS)[];
export const GRACE_LABELS: Record<keyof typeof GRACE_PERIODS, string> = {
  immediately: "Immediately",
  "1h": "After 1 hour",
  "24h": "After 24 hours",
  "7d": "After 7 days",
};
export const rotateSchema = z.object({ grace: z.enum(GRACE_CHOICES as [keyof typeof GRACE_PERIODS, ...(keyof typeof GRACE_PERIODS)[]]) });

export const inviteSchema = z.object({ email, role: z.enum(ROLES) });
export const roleChangeSchema = z.object({ role: z.enum(ROLES) });
/** What to do with a removed member's working keys: revoke them (the default) or hand them to another member. */
export const removeMemberSchema = z.discriminatedUnion("keys", [
  z.object({ keys: z.literal("revoke") }),
  z.object({ keys: z.literal("transfer"), transferTo: z.coerce.number().int().positive({ error: "Choose the member who takes the keys." }) }),
]);
export const acceptInvitationSchema = z.object({
  token: z.string().min(20).max(200),
  /** needed only when the invited address has no account yet */
  name: z.string().trim().max(160).optional(),
  password: z.string().min(1, { error: "Enter a password." }).max(200),
});

/** A real calendar day written YYYY-MM-DD (2026-02-30 and 2026-99-99 are refused, not rolled over). */
export const isCalendarDay = (s: string) => {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(s);
  if (!m) return false;
  const d = new Date(Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])));
  return d.getUTCFullYear() === Number(m[1]) && d.getUTCMonth() === Number(m[2]) - 1 && d.getUTCDate() === Number(m[3]);
};
const isoDay = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, { error: "Use a date like 2026-12-01." })
  .refine(isCalendarDay, { error: "That day does not exist in the calendar: use a date like 2026-12-01." });
export const USAGE_SORTS = ["day", "key", "endpoint", "requests", "units", "errors", "medianMs"] as const;
export const usageQuerySchema = z.object({
  from: isoDay.optional(),
  to: isoDay.optional(),
  keyId: z.coerce.number().int().positive().optional(),
  endpoint: z.string().max(64).optional(),
  sort: z.enum(USAGE_SORTS).default("day"),
  dir: z.enum(["asc", "desc"]).default("desc"),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(500).default(25),
});
export type UsageQuery = z.infer<typeof usageQuerySchema>;

/** Field errors from a zod error, keyed by the first path segment (for forms). */
export function fieldErrors(error: z.ZodError): Record<string, string> {
  const out: Record<string, string> = {};
  for (const issue of error.issues) {
    const k = String(issue.path[0] ?? "_");
    out[k] ??= issue.message;
  }
  return out;
}

export const saveModelSchema = z.object({
  name: z.string().trim().min(1, { error: "Name the model, e.g. “Hail book 2026”." }).max(160, { error: "Use at most 160 characters." }),
  description: z.string().trim().max(2000, { error: "Use at most 2000 characters." }).default(""),
  shared: z.boolean().default(true),
  model: z.custom<unknown>((v) => v !== undefined && v !== null, { error: "The model is missing." }),
  levels: z.string().trim().max(200).optional(),
  note: z.string().trim().max(300, { error: "Use at most 300 characters." }).optional(),
});

export const changeModelSchema = z
  .object({ shared: z.boolean().optional(), description: z.string().trim().max(2000, { error: "Use at most 2000 characters." }).optional() })
  .refine((v) => v.shared !== undefined || v.description !== undefined, { error: "Nothing to change." });

export const auditQuerySchema = z
  .object({
    from: isoDay.optional(),
    to: isoDay.optional(),
    /** an action ("key.revoked") or a family of actions ("key") */
    action: z.string().regex(/^[a-z_]+(\.[a-z_]+)?$/, { error: "Choose an action from the list." }).optional(),
    actorUserId: z.coerce.number().int().positive().optional(),
    limit: z.coerce.number().int().min(1).max(5000).default(200),
  })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { error: "“From” is after “To”: swap them to see this period.", path: ["to"] });
export type AuditQuery = z.infer<typeof auditQuerySchema>;
