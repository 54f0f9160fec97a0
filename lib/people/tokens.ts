import { createHash, createHmac, randomBytes, timingSafeEqual } from "node:crypto";

/**
 * Links sent by e-mail carry `<random>.<tag>`: 32 random bytes, and an HMAC-SHA-256 tag over the
 * purpose and the random part keyed with NEXTAUTH_SECRET. The database keeps only the SHA-256 of
 * the whole token (with usedAt and expiresAt), which makes every link single-use and expiring; the
 * tag lets a link that was altered in transit be told apart from one that is merely unknown,
 * without a database look-up, and stops a link for one purpose being used for another.
 */
export type TokenPurpose = "invite" | "reset" | "email";

export type TokenCheck = "ok" | "malformed" | "tampered";

const TAG_BYTES = 16;

function tag(secret: string, purpose: TokenPurpose, random: string): string {
  return createHmac("sha256", secret).update(`${purpose}:${random}`).digest().subarray(0, TAG_BYTES).toString("base64url");
}

export function issueToken(secret: string, purpose: TokenPurpose): { token: string; hash: string } {
  const random = randomBytes(32).toString("base64url");
  const token = `${random}.${tag(secret, purpose, random)}`;
  return { token, hash: hashToken(token) };
}

export function checkToken(secret: string, purpose: TokenPurpose, token: string): TokenCheck {
  const m = /^([A-Za-z0-9_-]{43})\.([A-Za-z0-9_-]{22})$/.exec(token);
  if (!m) return "malformed";
  // Compare the text, not decoded bytes: base64url's last character has spare bits, so two
  // different strings can decode alike, and an altered link must not pass.
  const want = Buffer.from(tag(secret, purpose, m[1]!));
  const got = Buffer.from(m[2]!);
  return got.length === want.length && timingSafeEqual(got, want) ? "ok" : "tampered";
}

export const hashToken = (token: string) => createHash("sha256").update(token, "utf8").digest("hex");

/** What a person sees when a link does not work. One wording per case, shared by every link page. */
export type LinkProblem = "invalid" | "expired" | "used";

export const LINK_MESSAGES: Record<LinkProblem, { title: string; body: string }> = {
  invalid: {
    title: "This link is not valid",
    body: "The link is incomplete or has been altered. Open it again from the e-mail, copying the whole address.",
  },
  expired: {
    title: "This link has expired",
    body: "Links in our e-mails work for a limited time. Ask for a new one.",
  },
  used: {
    title: "This link was already used",
    body: "Each link works once. If that was not you, ask for a new one and tell an admin.",
  },
};
