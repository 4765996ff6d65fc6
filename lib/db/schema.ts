import { sql } from "drizzle-orm";
import {
  bigint,
  boolean,
  datetime,
  index,
  int,
  json,
  mysqlEnum,
  mysqlTable,
  primaryKey,
  smallint,
  text,
  uniqueIndex,
  varchar,
} from "drizzle-orm/mysql-core";

const id = () => bigint("id", { mode: "number", unsigned: true }).autoincrement().primaryKey();
const ref = (name: string) => bigint(name, { mode: "number", unsigned: true });
const createdAt = () => datetime("created_at", { mode: "date", fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`);
const at = (name: string) => datetime(name, { mode: "date", fsp: 3 });

export const ROLES = ["admin", "developer", "billing"] as const;
export type Role = (typeof ROLES)[number];

export const organizations = mysqlTable(
  "organizations",
  {
    id: id(),
    slug: varchar("slug", { length: 64 }).notNull(),
    name: varchar("name", { length: 160 }).notNull(),
    plan: varchar("plan", { length: 32 }).notNull().default("free"),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("organizations_slug_uq").on(t.slug)],
);

export const users = mysqlTable(
  "users",
  {
    id: id(),
    email: varchar("email", { length: 254 }).notNull(),
    name: varchar("name", { length: 160 }).notNull(),
    passwordHash: varchar("password_hash", { length: 255 }).notNull(),
    emailVerifiedAt: at("email_verified_at"),
    createdAt: createdAt(),
    /** Bumped by a password reset and "sign out everywhere": every session issued under an older value ends. */
    sessionVersion: int("session_version", { unsigned: true }).notNull().default(0),
    /** The TOTP secret, sealed with a key derived from NEXTAUTH_SECRET (lib/auth/seal.ts); null without two-factor. */
    totpSecret: varchar("totp_secret", { length: 255 }),
    /** Set once the person has confirmed a first code; sign-in then asks for a code. */
    totpEnabledAt: at("totp_enabled_at"),
    /** The last accepted TOTP time step: a code is accepted once. */
    totpLastStep: bigint("totp_last_step", { mode: "number", unsigned: true }),
  },
  (t) => [uniqueIndex("users_email_uq").on(t.email)],
);

/** One row per sign-in: listed to the person, ended by sign-out, "sign out other sessions" or a version bump. */
export const userSessions = mysqlTable(
  "user_sessions",
  {
    id: id(),
    /** Random public id carried in the session token. */
    sid: varchar("sid", { length: 48 }).notNull(),
    userId: ref("user_id").notNull().references(() => users.id, { onDelete: "cascade" }),
    /** users.session_version when the session began. */
    version: int("version", { unsigned: true }).notNull(),
    ip: varchar("ip", { length: 64 }).notNull(),
    userAgent: varchar("user_agent", { length: 255 }).notNull(),
    /** "password" or "password+totp" or "password+recovery" */
    method: varchar("method", { length: 24 }).notNull(),
    createdAt: createdAt(),
    lastSeenAt: at("last_seen_at").notNull(),
    endedAt: at("ended_at"),
  },
  (t) => [uniqueIndex("user_sessions_sid_uq").on(t.sid), index("user_sessions_user_idx").on(t.userId, t.endedAt)],
);

/** Single-use recovery codes for two-factor sign-in; only a hash of each is kept. */
export const recoveryCodes = mysqlTable(
  "recovery_codes",
  {
    id: id(),
    userId: ref("user_id").notNull().references(() => users.id, { onDelete: "cascade" }),
    codeHash: varchar("code_hash", { length: 64 }).notNull(),
    usedAt: at("used_at"),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("recovery_codes_hash_uq").on(t.userId, t.codeHash)],
);

export const memberships = mysqlTable(
  "memberships",
  {
    userId: ref("user_id").notNull().references(() => users.id, { onDelete: "cascade" }),
    organizationId: ref("organization_id").notNull().references(() => organizations.id, { onDelete: "cascade" }),
    role: mysqlEnum("role", ROLES).notNull(),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.userId, t.organizationId] }), index("memberships_org_idx").on(t.organizationId)],
);

export const apiKeys = mysqlTable(
  "api_keys",
  {
    id: id(),
    organizationId: ref("organization_id").notNull().references(() => organizations.id, { onDelete: "cascade" }),
    createdBy: ref("created_by").references(() => users.id, { onDelete: "set null" }),
    label: varchar("label", { length: 120 }).notNull(),
    /** The public part of the key, shown in the portal and accepted in support requests. */
    prefix: varchar("prefix", { length: 32 }).notNull(),
    /** HMAC-SHA-256(pepper, secret) as lowercase hex; the secret itself is never stored. */
    secretHash: varchar("secret_hash", { length: 64 }).notNull(),
    scopes: json("scopes").$type<string[]>().notNull(),
    createdAt: createdAt(),
    lastUsedAt: at("last_used_at"),
    expiresAt: at("expires_at"),
    revokedAt: at("revoked_at"),
    /** The key this one replaced when it was issued by a rotation. */
    replacesKeyId: ref("replaces_key_id"),
    /** Set on a rotated-out key: it keeps working until this instant. */
    graceEndsAt: at("grace_ends_at"),
    /** When the admins were warned that this key expires soon (one warning per key). */
    expiryWarnedAt: at("expiry_warned_at"),
    /** Client address ranges (CIDR) the key is accepted from; null or empty accepts any address. */
    allowedCidrs: json("allowed_cidrs").$type<string[]>(),
  },
  (t) => [
    uniqueIndex("api_keys_prefix_uq").on(t.prefix),
    uniqueIndex("api_keys_secret_hash_uq").on(t.secretHash),
    index("api_keys_org_idx").on(t.organizationId),
  ],
);

export const usageEvents = mysqlTable(
  "usage_events",
  {
    id: id(),
    requestId: varchar("request_id", { length: 40 }).notNull(),
    keyId: ref("key_id").notNull(),
    organizationId: ref("organization_id").notNull(),
    endpoint: varchar("endpoint", { length: 64 }).notNull(),
    status: smallint("status", { unsigned: true }).notNull(),
    durationMs: int("duration_ms", { unsigned: true }).notNull(),
    computeUnits: bigint("compute_units", { mode: "number", unsigned: true }).notNull(),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex("usage_events_request_uq").on(t.requestId),
    index("usage_events_org_time_idx").on(t.organizationId, t.createdAt),
    index("usage_events_key_time_idx").on(t.keyId, t.createdAt),
  ],
);

export const auditEvents = mysqlTable(
  "audit_events",
  {
    id: id(),
    organizationId: ref("organization_id"),
    actorUserId: ref("actor_user_id"),
    /** "user", "key" or "system" (operator CLI, scheduled jobs). */
    actorType: varchar("actor_type", { length: 16 }).notNull(),
    action: varchar("action", { length: 64 }).notNull(),
    targetType: varchar("target_type", { length: 32 }).notNull(),
    targetId: varchar("target_id", { length: 64 }),
    detail: json("detail").$type<Record<string, unknown>>(),
    /** where the action came from: the client address the request carried (null for the CLI and jobs) */
    ip: varchar("ip", { length: 64 }),
    userAgent: varchar("user_agent", { length: 200 }),
    createdAt: createdAt(),
  },
  (t) => [index("audit_events_org_time_idx").on(t.organizationId, t.createdAt), index("audit_events_org_action_idx").on(t.organizationId, t.action)],
);

/** Named models an organisation keeps (the explorer's templates and users' saved models). */
export const savedModels = mysqlTable(
  "saved_models",
  {
    id: id(),
    organizationId: ref("organization_id").notNull().references(() => organizations.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 160 }).notNull(),
    description: text("description").notNull(),
    /** the latest version's model (each version is kept in saved_model_versions) */
    model: json("model").$type<unknown>().notNull(),
    /** shared with everyone in the organisation who may open models; otherwise its creator's only */
    shared: boolean("shared").notNull().default(false),
    latestVersion: int("latest_version", { unsigned: true }).notNull().default(1),
    createdBy: ref("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    updatedAt: at("updated_at"),
  },
  (t) => [uniqueIndex("saved_models_org_name_uq").on(t.organizationId, t.name)],
);

/** Every version of a saved model; versions never change once written. */
export const savedModelVersions = mysqlTable(
  "saved_model_versions",
  {
    id: id(),
    savedModelId: ref("saved_model_id").notNull().references(() => savedModels.id, { onDelete: "cascade" }),
    version: int("version", { unsigned: true }).notNull(),
    model: json("model").$type<unknown>().notNull(),
    /** the explorer's levels p when it was saved, e.g. "0.5, 0.99" */
    levels: varchar("levels", { length: 200 }),
    note: varchar("note", { length: 300 }),
    createdBy: ref("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("saved_model_versions_uq").on(t.savedModelId, t.version)],
);

/** Single-use links sent by e-mail: address verification and password reset. Only a hash of the token is kept. */
export const EMAIL_TOKEN_PURPOSES = ["verify", "reset"] as const;
export const emailTokens = mysqlTable(
  "email_tokens",
  {
    id: id(),
    userId: ref("user_id").notNull().references(() => users.id, { onDelete: "cascade" }),
    purpose: mysqlEnum("purpose", EMAIL_TOKEN_PURPOSES).notNull(),
    tokenHash: varchar("token_hash", { length: 64 }).notNull(),
    expiresAt: at("expires_at").notNull(),
    usedAt: at("used_at"),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("email_tokens_hash_uq").on(t.tokenHash), index("email_tokens_user_idx").on(t.userId, t.purpose)],
);

/** An admin's invitation to join an organisation with a role; the link carries a signed single-use token. */
export const invitations = mysqlTable(
  "invitations",
  {
    id: id(),
    organizationId: ref("organization_id").notNull().references(() => organizations.id, { onDelete: "cascade" }),
    email: varchar("email", { length: 254 }).notNull(),
    role: mysqlEnum("role", ROLES).notNull(),
    tokenHash: varchar("token_hash", { length: 64 }).notNull(),
    invitedBy: ref("invited_by").references(() => users.id, { onDelete: "set null" }),
    expiresAt: at("expires_at").notNull(),
    acceptedAt: at("accepted_at"),
    revokedAt: at("revoked_at"),
    sentAt: at("sent_at").notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("invitations_token_uq").on(t.tokenHash), index("invitations_org_idx").on(t.organizationId)],
);

/** One row per organisation, month (YYYY-MM, UTC) and threshold (percent) whose e-mail has gone out. */
export const quotaNotices = mysqlTable(
  "quota_notices",
  {
    organizationId: ref("organization_id").notNull().references(() => organizations.id, { onDelete: "cascade" }),
    month: varchar("month", { length: 7 }).notNull(),
    threshold: smallint("threshold", { unsigned: true }).notNull(),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.organizationId, t.month, t.threshold] })],
);

export type Organization = typeof organizations.$inferSelect;
export type NewOrganization = typeof organizations.$inferInsert;
export type User = typeof users.$inferSelect;
export type NewUser = typeof users.$inferInsert;
export type Membership = typeof memberships.$inferSelect;
export type ApiKey = typeof apiKeys.$inferSelect;
export type NewApiKey = typeof apiKeys.$inferInsert;
export type UsageEvent = typeof usageEvents.$inferSelect;
export type NewUsageEvent = typeof usageEvents.$inferInsert;
export type AuditEvent = typeof auditEvents.$inferSelect;
export type NewAuditEvent = typeof auditEvents.$inferInsert;
export type SavedModel = typeof savedModels.$inferSelect;
export type EmailToken = typeof emailTokens.$inferSelect;
export type Invitation = typeof invitations.$inferSelect;
export type UserSession = typeof userSessions.$inferSelect;
