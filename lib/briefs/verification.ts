/**
 * Verification codes for hearing briefs. The code is a fingerprint of the exact data behind a brief
 * (site, period, per-station night summary rows, thresholds, software version): anyone holding the
 * same data can recompute it, and two briefs made from the same data carry the same code.
 *
 * - Canonical JSON: object keys sorted by UTF-16 code unit order at every level, no whitespace,
 *   numbers in JavaScript's shortest round-trip form, `undefined` members dropped (as JSON.stringify).
 * - Digest: SHA-256 (FIPS 180-4) of the UTF-8 bytes of that text.
 * - Code: the first VERIFICATION_CODE_LENGTH characters of the digest in base32 (RFC 4648 §6
 *   alphabet A–Z 2–7, no padding); 10 characters = 50 bits.
 * Pure module (node:crypto only).
 */
import { createHash } from "node:crypto";

export const VERIFICATION_CODE_LENGTH = 10;
const BASE32_ALPHABET = "ABCDEFGHIJKLMNOPQRSTUVWXYZ234567"; // RFC 4648 §6

export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== "object") {
    if (typeof value === "number" && !Number.isFinite(value)) throw new RangeError(`canonical JSON cannot hold ${value}`);
    return JSON.stringify(value) ?? "null";
  }
  if (Array.isArray(value)) return `[${value.map((v) => (v === undefined ? "null" : canonicalJson(v))).join(",")}]`;
  const obj = value as Record<string, unknown>;
  const keys = Object.keys(obj)
    .filter((k) => obj[k] !== undefined)
    .sort();
  return `{${keys.map((k) => `${JSON.stringify(k)}:${canonicalJson(obj[k])}`).join(",")}}`;
}

/** RFC 4648 base32 without padding. */
export function base32(bytes: Uint8Array): string {
  let out = "";
  let bits = 0;
  let acc = 0;
  for (const b of bytes) {
    acc = (acc << 8) | b;
    bits += 8;
    while (bits >= 5) {
      out += BASE32_ALPHABET[(acc >>> (bits - 5)) & 31];
      bits -= 5;
    }
    acc &= (1 << bits) - 1;
  }
  if (bits > 0) out += BASE32_ALPHABET[(acc << (5 - bits)) & 31];
  return out;
}

export function sha256Hex(data: string | Uint8Array): string {
  return createHash("sha256").update(data).digest("hex");
}

/** { sha256 (hex), code } for a data object. */
export function verificationFor(data: unknown): { sha256: string; code: string; canonical: string } {
  const canonical = canonicalJson(data);
  const digest = createHash("sha256").update(canonical, "utf8").digest();
  return { sha256: digest.toString("hex"), code: base32(digest).slice(0, VERIFICATION_CODE_LENGTH), canonical };
}

/** Codes as typed by people: case-insensitive, spaces and dashes ignored. */
export function normaliseCode(input: string): string | null {
  const c = input.toUpperCase().replace(/[\s-]/g, "");
  return /^[A-Z2-7]{10}$/.test(c) ? c : null;
}
