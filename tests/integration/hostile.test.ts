/**
 * Hostile input and abuse against the running app (APP_URL, DATABASE_URL; loopback only, bounded):
 * random and malformed POST bodies never give a 500 nor store a bad row; oversize bodies are refused
 * early; a token over its rate limit gets 429; repeated wrong passwords lock the account; session
 * cookies and security headers are as docs/security.md says; other people's things answer 404.
 */
import { existsSync } from "node:fs";
import { request } from "node:http";
import { join } from "node:path";
import { randomBytes } from "node:crypto";
import fc from "fast-check";
import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb, pool } from "@/db";
import { stationTokens, uploads, users } from "@/db/schema";
import { hashPassword } from "@/lib/auth/password";
import { MAX_FAILED_SIGN_INS } from "@/lib/auth/options";
import { issueToken } from "@/lib/stations/tokens";
import { APP_URL, appUrl } from "../helpers/env";
import { demoAccount, signInAsRole, trySignIn } from "../helpers/session";
import { makeStation } from "../factories/stations";

const ROOT = join(__dirname, "..", "..");
const has = (p: string) => existsSync(join(ROOT, p));
const HAS_UPLOADS = has("app/api/v1/uploads/[id]/route.ts") && has("app/api/v1/stations/[slug]/uploads/route.ts");

type Reply = { status: number; headers: Headers; body: unknown; ms: number };

async function post(token: string, body: string, contentType: string): Promise<Reply> {
  const t = performance.now();
  const res = await fetch(appUrl("/api/v1/readings"), {
    method: "POST",
    headers: { authorization: `Bearer ${token}`, "content-type": contentType },
    body,
    signal: AbortSignal.timeout(20_000),
  });
  const text = await res.text();
  let parsed: unknown = text;
  try {
    parsed = JSON.parse(text);
  } catch {
    // left as text: the assertion below reports it
  }
  return { status: res.status, headers: res.headers, body: parsed, ms: performance.now() - t };
}

/** The reply is either the batch reply (200) or the documented error shape. */
function expectDocumentedShape(r: Reply) {
  expect(r.status, JSON.stringify(r.body).slice(0, 300)).not.toBe(500);
  expect([200, 400, 413, 415, 422, 429]).toContain(r.status);
  const b = r.body as Record<string, unknown>;
  if (r.status === 200) {
    expect(Object.keys(b).sort()).toEqual(["accepted", "duplicates", "rejected"]);
    expect(Number.isInteger(b.accepted)).toBe(true);
    expect(Number.isInteger(b.duplicates)).toBe(true);
    for (const x of b.rejected as { index: number; reason: string }[]) {
      expect(Number.isInteger(x.index)).toBe(true);
      expect(typeof x.reason).toBe("string");
    }
  } else {
    const e = (b as { error?: { code?: unknown; message?: unknown } }).error;
    expect(e, JSON.stringify(b).slice(0, 300)).toBeDefined();
    expect(typeof e!.code).toBe("string");
    expect(typeof e!.message).toBe("string");
  }
}

const isoish = fc.oneof(
  fc.date({ min: new Date("1995-01-01"), max: new Date("2030-01-01"), noInvalidDate: true }).map((d) => d.toISOString()),
  fc.string({ maxLength: 30 }),
  fc.constantFrom("2026-02-30T10:00:00Z", "2026-01-01T00:00:00", "1999-12-31T23:59:59Z", "2025-06-01T00:00:00+14:00"),
);
const hostileItem = fc.oneof(
  fc.record(
    {
      takenAt: isoish,
      mag: fc.oneof(fc.double({ min: -5, max: 30 }), fc.string({ maxLength: 8 }), fc.constant(null), fc.constant(1e308)),
      tempC: fc.oneof(fc.double({ min: -200, max: 200 }), fc.string({ maxLength: 5 }), fc.constant(undefined)),
    },
    { requiredKeys: [] },
  ),
  fc.anything({ maxDepth: 2 }),
);
const jsonBody = fc.oneof(
  fc.array(hostileItem, { minLength: 0, maxLength: 40 }).map((readings) => JSON.stringify({ readings })),
  fc.string({ maxLength: 200 }),
  fc.json({ maxDepth: 3 }),
);
const csvBody = fc.oneof(
  fc.array(fc.tuple(isoish, fc.oneof(fc.double({ min: -5, max: 30 }).map(String), fc.string({ maxLength: 6 })), fc.string({ maxLength: 5 })), { maxLength: 30 }).map(
    (rows) => ["takenAt,mag,tempC", ...rows.map((r) => r.join(","))].join("\n"),
  ),
  fc.string({ maxLength: 300 }),
);

afterAll(async () => {
  await pool().end();
});

describe("hostile POST bodies (property-based over HTTP)", () => {
  let fixture: Awaited<ReturnType<typeof makeStation>>;
  let accepted = 0;
  beforeAll(async () => {
    fixture = await makeStation();
  });

  it("random JSON and CSV bodies: never a 500, always the batch reply or {error:{code,message}}", async () => {
    // Two tokens for the one station keep the run under each token's 120 requests a minute.
    const second = await issueToken(getDb(), fixture.station.id, "hostile-2", null);
    let i = 0;
    await fc.assert(
      fc.asyncProperty(fc.oneof(jsonBody.map((b) => [b, "application/json"] as const), csvBody.map((b) => [b, "text/csv"] as const)), async ([body, type]) => {
        const r = await post(i++ % 2 ? second.token : fixture.token, body, type);
        expectDocumentedShape(r);
        if (r.status === 200) accepted += (r.body as { accepted: number }).accepted;
      }),
      { numRuns: 120, interruptAfterTimeLimit: 45_000 },
    );
  }, 90_000);

  it("stores no bad row: every stored reading of the station is in range, and as many as were accepted", async () => {
    const r = await getDb().execute<{ n: number; bad: number }>(sql`
      select count(*)::int as n,
             count(*) filter (where not (mag between 0 and 24) or mag = 'NaN'::real
                              or taken_at < '2000-01-01' or taken_at > now() + interval '5 minutes'
                              or (temp_c is not null and not (temp_c between -90 and 70))
                              or sun_alt_deg = 'NaN'::real or moon_alt_deg = 'NaN'::real)::int as bad
      from readings where station_id = ${fixture.station.id}`);
    expect(r.rows[0]!.bad).toBe(0);
    expect(r.rows[0]!.n).toBe(accepted);
  });
});

describe("size limits", () => {
  /** Sends headers claiming `declared` bytes, then a trickle; resolves with the reply's status and time. */
  function slowOversize(path: string, declared: number, headers: Record<string, string>): Promise<{ status: number; ms: number; body: string }> {
    return new Promise((resolve, reject) => {
      const url = new URL(path, APP_URL);
      const t = performance.now();
      const req = request(
        { host: url.hostname, port: url.port, path: url.pathname, method: "POST", headers: { ...headers, "content-length": String(declared) } },
        (res) => {
          let body = "";
          res.on("data", (c) => (body += c));
          res.on("end", () => {
            resolve({ status: res.statusCode ?? 0, ms: performance.now() - t, body });
            req.destroy();
          });
        },
      );
      req.on("error", (err) => (/(ECONNRESET|EPIPE|socket hang up)/.test(err.message) ? undefined : reject(err)));
      req.write("x".repeat(1024));
      const timer = setInterval(() => req.write("x".repeat(64)), 200);
      req.on("close", () => clearInterval(timer));
      setTimeout(() => {
        clearInterval(timer);
        req.destroy();
        reject(new Error(`no reply to a ${declared}-byte declared body within 10 s`));
      }, 10_000);
    });
  }

  it("POST /api/v1/readings with Content-Length 50 MB: 413 at once, without reading the body", async () => {
    const fixture = await makeStation();
    const r = await slowOversize("/api/v1/readings", 50 * 1024 * 1024, { authorization: `Bearer ${fixture.token}`, "content-type": "application/json" });
    expect(r.status).toBe(413);
    expect(r.ms).toBeLessThan(3000);
    expect((JSON.parse(r.body) as { error: { code: string } }).error.code).toBe("payload_too_large");
  });

  it.skipIf(!HAS_UPLOADS)("POST …/uploads with Content-Length 500 MB: 413 at once", async () => {
    const fixture = await makeStation();
    const r = await slowOversize(`/api/v1/stations/${fixture.station.slug}/uploads`, 500 * 1024 * 1024, {
      authorization: `Bearer ${fixture.token}`,
      "content-type": "multipart/form-data; boundary=xyz",
    });
    expect(r.status).toBe(413);
    expect(r.ms).toBeLessThan(3000);
  });
});

describe("rate limits", () => {
  it("a token over its limit gets 429 with Retry-After (a dedicated token, ~130 tiny requests)", async () => {
    const limit = Number(process.env.TOKEN_RATE_PER_MIN ?? 120);
    const fixture = await makeStation();
    const statuses: number[] = [];
    let limited: Reply | undefined;
    const deadline = Date.now() + 40_000;
    // 5 at a time, at most limit + 10 requests, at most 40 s.
    for (let i = 0; i < limit + 10 && Date.now() < deadline; i += 5) {
      const replies = await Promise.all(Array.from({ length: 5 }, () => post(fixture.token, '{"readings":[]}', "application/json")));
      for (const r of replies) {
        statuses.push(r.status);
        if (r.status === 429) limited ??= r;
        else expect(r.status).toBe(422);
      }
    }
    expect(limited, `no 429 after ${statuses.length} requests`).toBeDefined();
    expect(Number(limited!.headers.get("retry-after"))).toBeGreaterThanOrEqual(1);
    expect((limited!.body as { error: { code: string } }).error.code).toBe("rate_limited");
    expect(statuses.filter((s) => s !== 429).length).toBeLessThanOrEqual(limit);
  }, 60_000);

  it("repeated wrong passwords lock the account; the right one is then refused too", async () => {
    const email = `brute-${randomBytes(4).toString("hex")}@test.nightmark.example`;
    const password = `right-${randomBytes(6).toString("hex")}`;
    const [u] = await getDb()
      .insert(users)
      .values({ email, name: "Brute-force target", role: "volunteer", passwordHash: await hashPassword(password), emailVerified: new Date() })
      .returning({ id: users.id });
    try {
      const errors: string[] = [];
      for (let i = 0; i < MAX_FAILED_SIGN_INS; i++) {
        const r = await trySignIn(email, `wrong-${i}`);
        expect(r.ok).toBe(false);
        if (!r.ok) errors.push(r.error);
      }
      expect(errors.slice(0, -1).every((e) => e === "WrongPassword")).toBe(true);
      expect(errors.at(-1)).toBe("Locked");
      const right = await trySignIn(email, password);
      expect(right.ok).toBe(false);
      if (!right.ok) expect(right.error).toBe("Locked");
      const [row] = await getDb().select({ lockedUntil: users.lockedUntil }).from(users).where(eq(users.id, u!.id));
      expect(row!.lockedUntil!.getTime()).toBeGreaterThan(Date.now());
    } finally {
      await getDb().delete(users).where(eq(users.id, u!.id));
    }
  }, 60_000);
});

describe("session cookies and security headers", () => {
  it("the session cookie is HttpOnly, SameSite=Lax, Path=/, and Secure exactly when COOKIE_SECURE", async () => {
    const a = demoAccount("volunteer");
    const csrf = await fetch(appUrl("/api/auth/csrf"), { headers: { "x-forwarded-for": "198.51.100.201" } });
    const jar = csrf.headers.getSetCookie().map((c) => c.split(";")[0]!).join("; ");
    const { csrfToken } = (await csrf.json()) as { csrfToken: string };
    const res = await fetch(appUrl("/api/auth/callback/password"), {
      method: "POST",
      redirect: "manual",
      headers: { "content-type": "application/x-www-form-urlencoded", cookie: jar, "x-forwarded-for": "198.51.100.201" },
      body: new URLSearchParams({ csrfToken, email: a.email, password: a.password, json: "true" }).toString(),
    });
    const session = res.headers.getSetCookie().find((c) => /next-auth\.session-token=/.test(c));
    expect(session, "a session cookie is set").toBeDefined();
    expect(session).toMatch(/;\s*HttpOnly/i);
    expect(session).toMatch(/;\s*SameSite=Lax/i);
    expect(session).toMatch(/;\s*Path=\//i);
    if (process.env.COOKIE_SECURE === "true") expect(session).toMatch(/^__Secure-.*;\s*Secure/i);
    else expect(session).not.toMatch(/;\s*Secure/i);
    // the csrf cookie is HttpOnly as well
    expect(csrf.headers.getSetCookie().find((c) => c.includes("csrf-token"))).toMatch(/HttpOnly/i);
  });

  for (const path of ["/signin", "/api/health", "/api/v1/map"]) {
    it(`security headers on ${path}`, async () => {
      const res = await fetch(appUrl(path), { redirect: "manual" });
      const csp = res.headers.get("content-security-policy") ?? "";
      const directives = new Map(csp.split(";").map((d) => d.trim().split(/\s+/)).map(([k, ...v]) => [k!, v]));
      expect(directives.get("default-src")).toEqual(["'self'"]);
      expect(directives.get("script-src")).toContain("'self'");
      expect(directives.get("script-src")!.every((s) => ["'self'", "'unsafe-inline'"].includes(s) || s.startsWith("'nonce-"))).toBe(true);
      expect(directives.get("worker-src")).toEqual(["'self'", "blob:"]);
      expect(directives.get("img-src")).toEqual(["'self'", "data:", "blob:"]);
      expect(directives.get("connect-src")).toEqual(["'self'"]);
      expect(directives.get("font-src")).toEqual(["'self'"]);
      expect(directives.get("style-src")).toEqual(["'self'", "'unsafe-inline'"]);
      expect(directives.get("frame-ancestors")).toEqual(["'none'"]);
      expect(res.headers.get("referrer-policy")).toBe("strict-origin-when-cross-origin");
      expect(res.headers.get("x-content-type-options")).toBe("nosniff");
      expect(res.headers.get("permissions-policy")).toMatch(/geolocation=\(self\)/);
      expect(res.headers.get("x-powered-by")).toBeNull();
    });
  }
});

describe("secrets are shown once, and other people's things answer 404", () => {
  it("a token is stored as its SHA-256 only and never appears on the station's page afterwards", async () => {
    const fixture = await makeStation();
    const [row] = await getDb().select().from(stationTokens).where(eq(stationTokens.id, fixture.tokenId));
    expect(Object.values(row!).some((v) => typeof v === "string" && v.includes(fixture.token))).toBe(false);
    expect(row!.tokenHash).toMatch(/^[0-9a-f]{64}$/);
    const owner = await signInAsRole("volunteer"); // makeStation's stations belong to the demo volunteer
    const page = await owner(`/stations/${fixture.station.slug}`);
    expect(page.status).toBe(200);
    const html = await page.text();
    expect(html).toContain(row!.prefix);
    expect(html).not.toContain(fixture.token);
    expect(html).not.toContain(row!.tokenHash);
  });

  it("another person's station: its nights, readings and page answer 404", async () => {
    const fixture = await makeStation(); // owned by the demo volunteer, no site
    const steward = await signInAsRole("steward");
    for (const path of [`/api/v1/stations/${fixture.station.slug}/nights`, `/api/v1/stations/${fixture.station.slug}/readings`]) {
      const r = await steward(path);
      expect(r.status, path).toBe(404);
      expect(((await r.json()) as { error: { code: string } }).error.code).toBe("not_found");
    }
    // another station's token reads its own station only
    const other = await makeStation();
    const r = await fetch(appUrl(`/api/v1/stations/${fixture.station.slug}/nights`), { headers: { authorization: `Bearer ${other.token}` } });
    expect([403, 404]).toContain(r.status);
    expect((await steward(`/stations/${fixture.station.slug}`)).status).toBe(404);
  });

  it.skipIf(!HAS_UPLOADS)("another station's upload answers 404 (GET and retry), to a token and to a session", async () => {
    const fixture = await makeStation();
    const other = await makeStation();
    const [up] = await getDb()
      .insert(uploads)
      .values({ stationId: fixture.station.id, filename: "log.csv", sizeBytes: 10, sha256: randomBytes(32).toString("hex"), objectKey: `test/${randomBytes(6).toString("hex")}`, status: "failed" })
      .returning({ id: uploads.id });
    const own = await fetch(appUrl(`/api/v1/uploads/${up!.id}`), { headers: { authorization: `Bearer ${fixture.token}` } });
    expect(own.status).toBe(200);
    const steward = await signInAsRole("steward");
    const replies = [
      await fetch(appUrl(`/api/v1/uploads/${up!.id}`), { headers: { authorization: `Bearer ${other.token}` } }),
      await fetch(appUrl(`/api/v1/uploads/${up!.id}/retry`), { method: "POST", headers: { authorization: `Bearer ${other.token}` } }),
      await steward(`/api/v1/uploads/${up!.id}`),
      await steward(`/api/v1/uploads/${up!.id}/retry`, { method: "POST" }),
      await steward(`/api/v1/uploads/00000000-0000-4000-8000-000000000000`),
    ];
    for (const r of replies) expect(r.status, r.url).toBe(404);
  });
});
