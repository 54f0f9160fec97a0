import { RateLimiterPostgres, RateLimiterRes } from "rate-limiter-flexible";
import { pool } from "@/db";
import { rateLimited } from "@/lib/errors";

const g = globalThis as unknown as { __nmLimiters?: Map<string, RateLimiterPostgres> };

/**
 * Rate limits kept in PostgreSQL (table rate_limits, created by our migrations) so that every web
 * process shares them.
 */
function limiter(name: string, points: number, durationSec: number, blockDurationSec = 0) {
  g.__nmLimiters ??= new Map();
  let l = g.__nmLimiters.get(name);
  if (!l) {
    l = new RateLimiterPostgres({
      storeClient: pool(),
      storeType: "pool",
      tableName: "rate_limits",
      tableCreated: true,
      clearExpiredByTimeout: false,
      keyPrefix: name,
      points,
      duration: durationSec,
      blockDuration: blockDurationSec,
    });
    g.__nmLimiters.set(name, l);
  }
  return l;
}

/** Sign-in: 10 attempts per e-mail and 30 per client address in 15 minutes, then wait. */
export async function consumeSignIn(email: string, ip: string) {
  await consume(limiter("signin-email", 10, 15 * 60), email.toLowerCase(), "Too many sign-in attempts for this account.");
  await consume(limiter("signin-ip", 30, 15 * 60), ip, "Too many sign-in attempts from this address.");
}

/** Station tokens: 120 requests a minute each (a logger posting every minute stays far below). */
export async function consumeToken(tokenId: string) {
  await consume(limiter("token", Number(process.env.TOKEN_RATE_PER_MIN ?? 120), 60), tokenId, "This station token is over its rate limit.");
}

export async function consume(l: RateLimiterPostgres, key: string, message: string) {
  try {
    await l.consume(key);
  } catch (res) {
    if (res instanceof RateLimiterRes) throw rateLimited(Math.max(1, Math.ceil(res.msBeforeNext / 1000)), message);
    throw res;
  }
}

export async function resetSignIn(email: string) {
  await limiter("signin-email", 10, 15 * 60).delete(email.toLowerCase());
}
