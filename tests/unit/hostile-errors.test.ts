/**
 * Error mapping under pressure and secrets on error paths: a database that goes away mid-request
 * (also when drizzle wraps the driver's error) is a 503 with Retry-After, never a 500 with a
 * stack; no reply body carries a token, a password or SQL.
 */
import { describe, expect, it, vi } from "vitest";
import { AppError, isTransientDbError, unauthorized } from "@/lib/errors";
import { toErrorResponse } from "@/lib/http/respond";
import { authenticateToken, hashToken, newTokenSecret } from "@/lib/stations/tokens";
import type { Db } from "@/db";

/** What drizzle-orm 0.45 throws: a DrizzleQueryError ("Failed query: …") with the pg error as cause. */
function wrapped(cause: unknown) {
  const e = new Error(`Failed query: select * from station_tokens where token_hash = $1\nparams: abc`);
  (e as Error & { cause: unknown }).cause = cause;
  return e;
}
/** Every string reachable from a value (drizzle's SQL objects are circular). */
function collectStrings(v: unknown, out: string[] = [], seen = new Set<unknown>()): string[] {
  if (typeof v === "string") out.push(v);
  else if (v && typeof v === "object" && !seen.has(v)) {
    seen.add(v);
    for (const x of Object.values(v)) collectStrings(x, out, seen);
  }
  return out;
}
const pgError = (code: string, message: string) => Object.assign(new Error(message), { code });

describe("transient database errors", () => {
  const cases: [string, unknown][] = [
    ["connection refused", Object.assign(new Error("connect ECONNREFUSED 127.0.0.1:54339"), { code: "ECONNREFUSED" })],
    ["admin shutdown (fast restart)", pgError("57P01", "terminating connection due to administrator command")],
    ["starting up", pgError("57P03", "the database system is starting up")],
    ["connection terminated", new Error("Connection terminated unexpectedly")],
    ["pool connect timeout", new Error("timeout exceeded when trying to connect")],
    ["too many connections", pgError("53300", "sorry, too many clients already")],
  ];
  for (const [name, err] of cases) {
    it(`${name}: 503 + Retry-After, bare and wrapped by drizzle`, async () => {
      for (const e of [err, wrapped(err), wrapped(wrapped(err)), new AggregateError([err], "connect failed")]) {
        expect(isTransientDbError(e)).toBe(true);
        const res = toErrorResponse(e);
        expect(res.status).toBe(503);
        expect(Number(res.headers.get("retry-after"))).toBeGreaterThan(0);
        const body = (await res.json()) as { error: { code: string } };
        expect(body.error.code).toBe("unavailable");
      }
    });
  }
  it("input errors and bugs are not transient", () => {
    expect(isTransientDbError(pgError("23505", "duplicate key value"))).toBe(false);
    expect(isTransientDbError(wrapped(pgError("22P02", "invalid input syntax for type uuid")))).toBe(false);
    expect(isTransientDbError(new TypeError("x is undefined"))).toBe(false);
    expect(isTransientDbError(null)).toBe(false);
    // a cause cycle does not loop forever
    const a = new Error("a") as Error & { cause?: unknown };
    a.cause = a;
    expect(isTransientDbError(a)).toBe(false);
  });
});

describe("secrets never reach a reply", () => {
  it("a 500 says nothing about the error (SQL, params, a token in the message)", async () => {
    const token = newTokenSecret();
    const spy = vi.spyOn(console, "error").mockImplementation(() => {});
    const res = toErrorResponse(new Error(`Failed query: select … params: ${token}, password=hunter2`));
    spy.mockRestore();
    expect(res.status).toBe(500);
    const text = await res.text();
    expect(text).not.toContain(token);
    expect(text).not.toContain("hunter2");
    expect(text).not.toMatch(/select|params|stack/i);
  });

  it("authenticateToken looks a token up by its hash only, and its errors do not echo it", async () => {
    const token = newTokenSecret();
    const seen: unknown[] = [];
    // A stand-in for the drizzle chain select().from().innerJoin().leftJoin().where().limit().
    const chain: Record<string, unknown> = {};
    for (const k of ["from", "innerJoin", "leftJoin", "where"]) chain[k] = (...args: unknown[]) => (seen.push(args), chain);
    chain.limit = async () => [];
    const db = { select: () => chain } as unknown as Db;
    const err = await authenticateToken(db, `Bearer ${token}`).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(AppError);
    expect((err as AppError).status).toBe(401);
    expect((err as AppError).message).not.toContain(token);
    const strings = collectStrings(seen);
    expect(strings.some((x) => x.includes(token))).toBe(false);
    expect(strings.some((x) => x === hashToken(token))).toBe(true);
    expect(hashToken(token)).toMatch(/^[0-9a-f]{64}$/);
    const malformed = await authenticateToken(db, `Token ${token}`).catch((e: unknown) => e);
    expect((malformed as AppError).message).not.toContain(token);
    expect(unauthorized().message).not.toContain("nmk_");
  });

  it("tokens compare in constant time (timingSafeEqual on the stored hash)", async () => {
    const { readFileSync } = await import("node:fs");
    const src = readFileSync(new URL("../../lib/stations/tokens.ts", import.meta.url), "utf8");
    expect(src).toMatch(/timingSafeEqual\(Buffer\.from\(row\.tokenHash, "hex"\), Buffer\.from\(hash, "hex"\)\)/);
    expect(src).not.toMatch(/tokenHash\s*===|===\s*hash\b/);
  });
});
