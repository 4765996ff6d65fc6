import { createHmac, randomBytes, timingSafeEqual } from "node:crypto";
import { crc32 } from "node:zlib";

// An API key reads `sfk_<public id>_<secret><checksum>`:
//   public id: 10 base32 characters (50 bits), shown in the portal as the key's prefix `sfk_<public id>`;
//   secret:    26 base32 characters (130 bits of randomness);
//   checksum:  6 base32 characters, CRC-32 of everything before it, so a mistyped or truncated key is
//              refused without a database look-up.
// Only HMAC-SHA-256(pepper, key) is stored.

const ALPHABET = "abcdefghijkmnpqrstuvwxyz23456789"; // 32 symbols, no 0/o/1/l
const KEY_RE = /^sfk_([a-km-np-z2-9]{10})_([a-km-np-z2-9]{26})([a-km-np-z2-9]{6})$/;

function base32(bytes: Buffer, length: number): string {
  let bits = 0;
  let acc = 0;
  let out = "";
  for (const b of bytes) {
    acc = (acc << 8) | b;
    bits += 8;
    while (bits >= 5 && out.length < length) {
      out += ALPHABET[(acc >>> (bits - 5)) & 31];
      bits -= 5;
    }
  }
  return out;
}

function checksum(body: string): string {
  const c = crc32(body) >>> 0;
  let out = "";
  for (let i = 0; i < 6; i++) out += ALPHABET[(c >>> (i * 5)) & 31];
  return out;
}

export interface NewKeyMaterial {
  /** The whole key: shown once, never stored. */
  secret: string;
  /** The public prefix, stored and shown in the portal. */
  prefix: string;
}

export function generateKeyMaterial(): NewKeyMaterial {
  const publicId = base32(randomBytes(7), 10);
  const secretPart = base32(randomBytes(17), 26);
  const body = `sfk_${publicId}_${secretPart}`;
  return { secret: body + checksum(body), prefix: `sfk_${publicId}` };
}

/** Checks a presented key's shape and checksum; returns its public prefix, or null when malformed. */
export function parseKey(key: string): { prefix: string } | null {
  const m = KEY_RE.exec(key);
  if (!m) return null;
  const body = key.slice(0, key.length - 6);
  const expected = Buffer.from(checksum(body));
  const given = Buffer.from(m[3]);
  if (!timingSafeEqual(expected, given)) return null;
  return { prefix: `sfk_${m[1]}` };
}

/** The stored form of a key: HMAC-SHA-256 under the server-side pepper, as hex. */
export function hashKey(key: string, pepper: string): string {
  return createHmac("sha256", pepper).update(key).digest("hex");
}

export function pepper(): string {
  const p = process.env.SUMFOLD_KEY_PEPPER;
  if (!p) throw new Error("SUMFOLD_KEY_PEPPER is not set");
  return p;
}
