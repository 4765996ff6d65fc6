import type { Role } from "@/lib/db/schema";

/** What each role may do, declared once; the role -> permission map below is derived from this table. */
export const PERMISSIONS = {
  /** see and manage one's own keys */
  "keys.own": ["admin", "developer"],
  /** see and manage every key of the organisation */
  "keys.all": ["admin"],
  /** invite, change roles, remove members */
  "members.manage": ["admin"],
  /** see usage of one's own keys */
  "usage.own": ["admin", "developer", "billing"],
  /** see usage of the whole organisation */
  "usage.all": ["admin", "billing"],
  /** run models from the explorer */
  explore: ["admin", "developer"],
  /** upload datasets and add versions */
  "datasets.upload": ["admin", "developer"],
  /** read the organisation's audit log */
  "audit.read": ["admin"],
  /** open, save and share models in the organisation */
  "models.read": ["admin", "developer"],
  /** download a dataset's file as uploaded (claim-level data: not for billing contacts) */
  "datasets.raw": ["admin", "developer"],
  /** read the plan and quota */
  "plan.read": ["admin", "developer", "billing"],
  /** change the plan, the card, billing details and contacts; read and pay invoices */
  "billing.manage": ["admin", "billing"],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof PERMISSIONS;

export const ROLE_PERMISSIONS: Record<Role, Permission[]> = (() => {
  const out: Record<Role, Permission[]> = { admin: [], developer: [], billing: [] };
  for (const [perm, roles] of Object.entries(PERMISSIONS) as [Permission, readonly Role[]][]) for (const r of roles) out[r].push(perm);
  return out;
})();

export const can = (role: Role, perm: Permission) => (PERMISSIONS[perm] as readonly Role[]).includes(role);

export const ROLE_LABELS: Record<Role, string> = { admin: "Admin", developer: "Developer", billing: "Billing contact" };
