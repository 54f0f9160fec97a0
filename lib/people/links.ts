import { env } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { checkToken, LINK_MESSAGES, type LinkProblem, type TokenPurpose } from "./tokens";

/** Absolute links for e-mails: always the configured APP_URL, never the request's Host header. */
export const appLink = (path: string) => new URL(path, env().APP_URL).toString();

export const linkError = (problem: LinkProblem) =>
  new AppError(`link_${problem}`, problem === "invalid" ? 400 : 410, LINK_MESSAGES[problem].title, { problem });

/** Shape and HMAC tag of a link token, before any database look-up. */
export function tokenShapeProblem(purpose: TokenPurpose, token: string): LinkProblem | null {
  return checkToken(env().NEXTAUTH_SECRET, purpose, token) === "ok" ? null : "invalid";
}

/** The single decision for a stored one-use link row. */
export function rowProblem(row: { usedAt: Date | null; expiresAt: Date; revokedAt?: Date | null } | undefined, now = new Date()): LinkProblem | null {
  if (!row || row.revokedAt) return "invalid";
  if (row.usedAt) return "used";
  if (row.expiresAt.getTime() <= now.getTime()) return "expired";
  return null;
}
