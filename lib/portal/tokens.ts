import "server-only";
import { createHmac, randomBytes } from "node:crypto";

/**
 * Single-use link tokens: 32 random bytes (base64url). Only HMAC-SHA-256(NEXTAUTH_SECRET, token) is stored,
 * so a database leak yields no usable link and a token cannot be forged without the server's secret.
 */
export function newLinkToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString("base64url");
  return { token, hash: hashLinkToken(token) };
}

export function hashLinkToken(token: string): string {
  const secret = process.env.NEXTAUTH_SECRET;
  if (!secret) throw new Error("NEXTAUTH_SECRET is not set");
  return createHmac("sha256", secret).update(`link:${token}`).digest("hex");
}

export const baseUrl = () => (process.env.SUMFOLD_BASE_URL ?? process.env.NEXTAUTH_URL ?? "http://127.0.0.1:3000").replace(/\/$/, "");
