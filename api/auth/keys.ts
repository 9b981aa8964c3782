/**
 * API keys: `sk_<id>_<secret>`, where `<id>` (16 hex digits) is public and names the stored
 * record, and `<secret>` is 32 random bytes in base64url (256 bits from the operating
 * system's CSPRNG via `crypto.getRandomValues`). Only the SHA-256 of the secret is stored; the
 * key itself is shown once, when it is made. A presented key is checked by hashing its secret
 * and comparing the digests in constant time (`crypto.timingSafeEqual`), so the time taken
 * does not depend on how much of a guess was right.
 *
 * A fast unsalted hash is the usual choice for high-entropy random keys (a password needs a
 * slow salted hash because people choose guessable ones; 256 random bits cannot be guessed).
 *
 * @module
 */
import { createHash, timingSafeEqual } from "node:crypto";
import { Buffer } from "node:buffer";

/** The shape of a key: prefix, 16-hex id, 43-character base64url secret. */
export const API_KEY_PATTERN = /^sk_([0-9a-f]{16})_([A-Za-z0-9_-]{43})$/;

/** A new key with the record fields to store. */
export interface NewApiKey {
  /** The whole key, for the caller, once. */
  key: string;
  id: string;
  /** Hex SHA-256 of the secret part. */
  hash: string;
}

function base64url(bytes: Uint8Array): string {
  let s = "";
  for (const b of bytes) s += String.fromCharCode(b);
  return btoa(s).replace(/\+/g, "-").replace(/\//g, "_").replace(/=+$/, "");
}

/** Hex SHA-256 of a string's UTF-8 bytes. */
export function sha256Text(text: string): string {
  return createHash("sha256").update(text, "utf8").digest("hex");
}

/**
 * Make a new random API key.
 *
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { API_KEY_PATTERN, newApiKey, parseApiKey, secretMatches } from "./keys.ts";
 * const k = newApiKey();
 * assert.match(k.key, API_KEY_PATTERN);
 * const parsed = parseApiKey(k.key)!;
 * assert.equal(parsed.id, k.id);
 * assert.equal(secretMatches(parsed.secret, k.hash), true);
 * assert.equal(secretMatches("x" + parsed.secret.slice(1), k.hash), false);
 * ```
 */
export function newApiKey(): NewApiKey {
  const id = Array.from(
    crypto.getRandomValues(new Uint8Array(8)),
    (b) => b.toString(16).padStart(2, "0"),
  ).join("");
  const secret = base64url(crypto.getRandomValues(new Uint8Array(32)));
  return { key: `sk_${id}_${secret}`, id, hash: sha256Text(secret) };
}

/** The id and secret of a key in the `sk_<id>_<secret>` form, or null for anything else. */
export function parseApiKey(key: string): { id: string; secret: string } | null {
  const m = API_KEY_PATTERN.exec(key);
  return m ? { id: m[1], secret: m[2] } : null;
}

/** Constant-time check that `secret` hashes to the stored hex digest `hash`. */
export function secretMatches(secret: string, hash: string): boolean {
  const a = createHash("sha256").update(secret, "utf8").digest();
  const b = /^[0-9a-f]{64}$/.test(hash) ? Buffer.from(hash, "hex") : new Uint8Array(32);
  return timingSafeEqual(a, b) && b.length === 32 && /^[0-9a-f]{64}$/.test(hash);
}

/**
 * Constant-time equality of two secrets of any lengths (both are hashed first, so neither the
 * length nor the content of the expected one leaks through timing).
 */
export function secretsEqual(given: string, expected: string): boolean {
  const a = createHash("sha256").update(given, "utf8").digest();
  const b = createHash("sha256").update(expected, "utf8").digest();
  return timingSafeEqual(a, b);
}
