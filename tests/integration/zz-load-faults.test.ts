/**
 * Load and faults (issue #8). Named zz- so it runs LAST in the integration project: it takes shared
 * services away (PostgreSQL, the worker, the SMTP and S3 fakes) and always puts them back.
 * Loopback only; every loop is bounded in count and time. Uses APP_URL / DATABASE_URL from env.
 *
 * What it needs, and skips without:
 * - restarting PostgreSQL: the data folder of the cluster behind DATABASE_URL (npm test:
 *   .nightmark/pg-test, or NIGHTMARK_PG_DATA), restarted with scripts/lib/postgres.mjs restartCluster;
 * - killing the worker: its pid file from scripts/stack.mjs (.nightmark/run/test-worker.pid), which
 *   restarts it after 3 s; and the upload routes;
 * - the fakes: their pid files (.nightmark/run/test-smtp.pid, test-s3.pid). They are paused with
 *   SIGSTOP (a service that accepts connections and never answers: the worst kind of down) and
 *   resumed with SIGCONT, so the stack's own processes are never replaced.
 */
import { randomBytes } from "node:crypto";
import { existsSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { sql } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { getDb, pool } from "@/db";
import { issueToken } from "@/lib/stations/tokens";
import { DATABASE_URL, appUrl } from "../helpers/env";
import { makeStation } from "../factories/stations";

const ROOT = join(__dirname, "..", "..");
const RUN = join(ROOT, ".nightmark", "run");
const PG_DATA = process.env.NIGHTMARK_PG_DATA ?? join(ROOT, ".nightmark", "pg-test");
const PG_LOG = process.env.NIGHTMARK_PG_LOG ?? join(ROOT, ".nightmark", "logs", "postgres-test.log");
const HAS_UPLOADS = existsSync(join(ROOT, "app/api/v1/stations/[slug]/uploads/route.ts")) && existsSync(join(ROOT, "app/api/v1/uploads/[id]/route.ts"));

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** True when PG_DATA is the running cluster that DATABASE_URL points at. */
function pgIsOurs(): boolean {
  const pidFile = join(PG_DATA, "postmaster.pid");
  if (!existsSync(pidFile)) return false;
  const lines = readFileSync(pidFile, "utf8").split("\n");
  return lines[3]?.trim() === new URL(DATABASE_URL).port;
}

/** The stack's pid files describe the services behind DATABASE_URL only for the npm test stack. */
const IS_TEST_STACK = new URL(DATABASE_URL).port === (process.env.NIGHTMARK_TEST_PG_PORT ?? "54339");

function livePid(name: string): number | undefined {
  if (!IS_TEST_STACK) return undefined;
  const file = join(RUN, name);
  if (!existsSync(file)) return undefined;
  try {
    const info = JSON.parse(readFileSync(file, "utf8")) as { pid?: number };
    if (!info.pid) return undefined;
    process.kill(info.pid, 0);
    return info.pid;
  } catch {
    return undefined;
  }
}

type Batch = { takenAt: string; mag: number }[];

/** Distinct readings at minute cadence from a start instant; mag within range. */
function readingsFrom(startIso: string, n: number, offsetMin = 0): Batch {
  const t0 = Date.parse(startIso) + offsetMin * 60_000;
  return Array.from({ length: n }, (_, i) => ({ takenAt: new Date(t0 + i * 60_000).toISOString(), mag: 21 + ((i * 7) % 50) / 100 }));
}

type PostResult = { status: number; accepted: number; duplicates: number; retryAfter: string | null; code?: string; ms: number; text: string };

async function postOnce(token: string, readings: Batch | string, type = "application/json"): Promise<PostResult> {
  const t = performance.now();
  try {
    const res = await fetch(appUrl("/api/v1/readings"), {
      method: "POST",
      headers: { authorization: `Bearer ${token}`, "content-type": type },
      body: typeof readings === "string" ? readings : JSON.stringify({ readings }),
      signal: AbortSignal.timeout(15_000),
    });
    const text = await res.text();
    const j = (() => {
      try {
        return JSON.parse(text) as { accepted?: number; duplicates?: number; error?: { code: string } };
      } catch {
        return {};
      }
    })();
    return { status: res.status, accepted: j.accepted ?? 0, duplicates: j.duplicates ?? 0, retryAfter: res.headers.get("retry-after"), code: j.error?.code, ms: performance.now() - t, text };
  } catch (err) {
    // A timeout here is a hang: exactly what must not happen.
    return { status: -1, accepted: 0, duplicates: 0, retryAfter: null, ms: performance.now() - t, text: String(err) };
  }
}

async function waitFor<T>(what: string, fn: () => Promise<T | undefined | false>, timeoutMs: number, everyMs = 250): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  let last: unknown;
  for (;;) {
    try {
      const v = await fn();
      if (v !== undefined && v !== false) return v as T;
    } catch (err) {
      last = err;
    }
    if (Date.now() > deadline) throw new Error(`${what}: not within ${timeoutMs} ms${last ? ` (last error: ${String(last)})` : ""}`);
    await sleep(everyMs);
  }
}

async function storedCount(stationId: string): Promise<number> {
  const r = await getDb().execute<{ n: number }>(sql`select count(*)::int as n from readings where station_id = ${stationId}`);
  return r.rows[0]!.n;
}

async function healthy(): Promise<boolean> {
  const r = await fetch(appUrl("/api/health"), { signal: AbortSignal.timeout(5000) }).catch(() => null);
  return r?.status === 200;
}

/** A logger file of n minute readings (UTC), for the upload path. */
function loggerCsv(startIso: string, n: number): string {
  const rows = readingsFrom(startIso, n).map((r) => `${r.takenAt},${r.mag},10.5`);
  return `# logger: fault test\ntakenAt,mag,tempC\n${rows.join("\n")}\n`;
}

async function uploadFile(slug: string, token: string, csv: string): Promise<string> {
  const form = new FormData();
  form.set("file", new Blob([csv], { type: "text/csv" }), `fault-${randomBytes(3).toString("hex")}.csv`);
  form.set("mapping", JSON.stringify({ timeColumn: "takenAt", timeZone: "UTC", magColumn: "mag", tempColumn: "tempC" }));
  const res = await fetch(appUrl(`/api/v1/stations/${slug}/uploads`), { method: "POST", headers: { authorization: `Bearer ${token}` }, body: form });
  const body = (await res.json()) as { id?: string };
  expect(res.status, JSON.stringify(body)).toBe(202);
  return body.id!;
}

async function uploadState(id: string, token: string) {
  const res = await fetch(appUrl(`/api/v1/uploads/${id}`), { headers: { authorization: `Bearer ${token}` }, signal: AbortSignal.timeout(5000) });
  if (res.status !== 200) return undefined;
  return (await res.json()) as { status: string; rowsRead: number; accepted: number; duplicates: number; rejectedCount: number; bytesProcessed: number; error?: string | null };
}

afterAll(async () => {
  await pool().end();
});

describe("load: 20 clients posting overlapping batches at once", () => {
  it("every distinct reading is stored exactly once and the replies add up", async () => {
    const fixture = await makeStation();
    // 20 senders of the same station (20 tokens), 3 batches each of 200 readings drawn from 1,500
    // distinct ones with overlaps between clients and duplicates inside batches.
    const tokens = [fixture.token];
    for (let i = 1; i < 20; i++) tokens.push((await issueToken(getDb(), fixture.station.id, `load-${i}`, null)).token);
    const pool1500 = readingsFrom("2026-03-10T03:00:00Z", 1500);
    const batches: Batch[][] = tokens.map((_, c) =>
      Array.from({ length: 3 }, (_, b) => {
        const start = (c * 61 + b * 397) % 1300;
        const slice = pool1500.slice(start, start + 200);
        return [...slice, ...slice.slice(0, 10)]; // 10 in-batch duplicates
      }),
    );
    const sent = batches.flat(2);
    const distinct = new Set(sent.map((r) => r.takenAt)).size;
    const results = await Promise.all(
      tokens.map(async (token, c) => {
        const out: PostResult[] = [];
        for (const b of batches[c]!) out.push(await postOnce(token, b));
        return out;
      }),
    );
    const flat = results.flat();
    for (const r of flat) expect(r.status, r.text.slice(0, 200)).toBe(200);
    for (const [c, list] of results.entries()) list.forEach((r, b) => expect(r.accepted + r.duplicates).toBe(batches[c]![b]!.length));
    expect(flat.reduce((s, r) => s + r.accepted, 0)).toBe(distinct);
    expect(flat.reduce((s, r) => s + r.accepted + r.duplicates, 0)).toBe(sent.length);
    expect(await storedCount(fixture.station.id)).toBe(distinct);
  }, 60_000);
});

describe.skipIf(!pgIsOurs())("PostgreSQL restarted while clients post", () => {
  it("clients get 503 + Retry-After (no hang, no 500); after it is back, retries store everything exactly once", async () => {
    const { restartCluster } = (await import(join(ROOT, "scripts/lib/postgres.mjs") as string)) as {
      restartCluster: (c: { dataDir: string; logFile: string }, o: { mode?: string; pauseMs?: number }) => Promise<void>;
    };
    const fixture = await makeStation();
    const CLIENTS = 4;
    const PER_CLIENT = 40;
    const tokens = [fixture.token];
    for (let i = 1; i < CLIENTS; i++) tokens.push((await issueToken(getDb(), fixture.station.id, `fault-${i}`, null)).token);
    const plan = tokens.map((_, c) => Array.from({ length: PER_CLIENT }, (_, b) => readingsFrom("2026-04-01T04:00:00Z", 100, (c * PER_CLIENT + b) * 100)));
    const expected = CLIENTS * PER_CLIENT * 100;

    // An import running across the restart, when uploads exist.
    let upload: { id: string; token: string; stationId: string; rows: number } | undefined;
    if (HAS_UPLOADS) {
      const up = await makeStation();
      const rows = 30_000;
      upload = { id: await uploadFile(up.station.slug, up.token, loggerCsv("2026-05-01T00:00:00Z", rows)), token: up.token, stationId: up.station.id, rows };
    }

    let stoppedAt = Infinity;
    const acceptedBefore: Batch[] = [];
    const unexpected: PostResult[] = [];
    const unavailable: PostResult[] = [];
    const deadline = Date.now() + 90_000;
    const clients = tokens.map(async (token, c) => {
      for (const batch of plan[c]!) {
        for (let attempt = 0; attempt < 40 && Date.now() < deadline; attempt++) {
          const startedAt = Date.now();
          const r = await postOnce(token, batch);
          if (r.status === 200) {
            expect(r.accepted + r.duplicates).toBe(batch.length);
            if (startedAt < stoppedAt) acceptedBefore.push(batch);
            break;
          }
          if (r.status === 503) {
            unavailable.push(r);
            // Honour Retry-After, capped at 1 s so the test stays short.
            await sleep(Math.min(1000, Number(r.retryAfter ?? 1) * 1000));
            continue;
          }
          unexpected.push(r);
          await sleep(500);
        }
        await sleep(20);
      }
    });

    await sleep(700);
    stoppedAt = Date.now();
    try {
      await restartCluster({ dataDir: PG_DATA, logFile: PG_LOG }, { mode: "fast", pauseMs: 3000 });
    } finally {
      // whatever happened, the database must be up for the rest of the suite
      await waitFor("PostgreSQL back", async () => (await pool().query("select 1").then(() => true).catch(() => false)) || undefined, 30_000);
    }
    await Promise.all(clients);

    expect(unexpected.map((r) => `${r.status} ${r.text.slice(0, 160)}`)).toEqual([]);
    expect(unavailable.length, "some requests met the database down").toBeGreaterThan(0);
    for (const r of unavailable) {
      expect(r.code).toBe("unavailable");
      expect(Number(r.retryAfter)).toBeGreaterThan(0);
      expect(r.ms, "a 503 comes quickly, not after a hang").toBeLessThan(10_000);
      expect(r.text).not.toMatch(/at .*\.(js|ts):\d+|stack|ECONN|select /i);
    }
    // everything is stored exactly once (the primary key makes a second copy impossible; the count
    // shows nothing is missing), including every batch accepted before the stop
    expect(await storedCount(fixture.station.id)).toBe(expected);
    const before = acceptedBefore.flat().map((r) => r.takenAt);
    const present = await pool().query<{ n: number }>(
      "select count(*)::int as n from readings where station_id = $1 and taken_at = any($2::timestamptz[])",
      [fixture.station.id, before],
    );
    expect(present.rows[0]!.n).toBe(before.length);

    // the app's pool recovered, pages serve, and the worker still summarises
    expect(await healthy()).toBe(true);
    expect((await fetch(appUrl("/signin"))).status).toBe(200);
    await waitFor(
      "the worker summarised the nights posted across the restart",
      async () => {
        const r = await getDb().execute<{ n: number }>(sql`select count(*)::int as n from dirty_nights where station_id = ${fixture.station.id}`);
        return r.rows[0]!.n === 0 || undefined;
      },
      60_000,
      500,
    );
    const summaries = await getDb().execute<{ n: number }>(sql`select coalesce(sum(readings), 0)::int as n from night_summaries where station_id = ${fixture.station.id}`);
    expect(summaries.rows[0]!.n).toBe(expected);

    if (upload) {
      const done = await waitFor("the import running across the restart finished", async () => {
        const s = await uploadState(upload!.id, upload!.token);
        return s && ["done", "failed"].includes(s.status) ? s : undefined;
      }, 120_000, 500);
      expect(done.status, done.error ?? "").toBe("done");
      expect(done.accepted).toBe(upload.rows);
      expect(await storedCount(upload.stationId)).toBe(upload.rows);
    }
  }, 180_000);
});

describe.skipIf(!HAS_UPLOADS || !livePid("test-worker.pid"))("the worker killed mid-import", () => {
  it("is restarted by the stack and the import completes with every row stored once", async () => {
    const fixture = await makeStation();
    const rows = 120_000;
    const id = await uploadFile(fixture.station.slug, fixture.token, loggerCsv("2025-01-01T00:00:00Z", rows));
    await waitFor("the import started", async () => {
      const s = await uploadState(id, fixture.token);
      return s && (s.status === "importing" && s.rowsRead > 0 ? s : s.status === "done" ? s : undefined);
    }, 60_000, 100);
    const pid = livePid("test-worker.pid");
    const before = await uploadState(id, fixture.token);
    if (pid && before?.status === "importing") process.kill(pid, "SIGKILL");
    // scripts/stack.mjs restarts the worker after 3 s
    await waitFor("a new worker", async () => { const p = livePid("test-worker.pid"); return p && p !== pid ? p : undefined; }, 30_000, 250);
    const end = await waitFor("the import finished after the restart", async () => {
      const s = await uploadState(id, fixture.token);
      return s && ["done", "failed"].includes(s.status) ? s : undefined;
    }, 120_000, 500);
    expect(end.status, end.error ?? "").toBe("done");
    expect(end.accepted + end.duplicates + end.rejectedCount).toBe(end.rowsRead);
    expect(end.accepted).toBe(rows);
    expect(await storedCount(fixture.station.id)).toBe(rows);
  }, 240_000);
});

describe("SMTP and S3 fakes down", () => {
  const smtp = livePid("test-smtp.pid");
  const s3 = livePid("test-s3.pid");
  it.skipIf(!smtp || !s3)("the app keeps serving; work that needs them waits and completes once they are back", async () => {
    const fixture = await makeStation();
    const paused: number[] = [];
    try {
      for (const pid of [smtp!, s3!]) {
        process.kill(pid, "SIGSTOP");
        paused.push(pid);
      }
      // health and pages do not depend on mail or the object store
      const t = performance.now();
      expect(await healthy()).toBe(true);
      expect((await fetch(appUrl("/signin"), { signal: AbortSignal.timeout(10_000) })).status).toBe(200);
      expect((await fetch(appUrl("/"), { redirect: "manual", signal: AbortSignal.timeout(10_000) })).status).toBeLessThan(500);
      // token POSTs keep working: readings do not touch S3 or SMTP
      const r = await postOnce(fixture.token, readingsFrom("2026-06-01T05:00:00Z", 50));
      expect(r.status).toBe(200);
      expect(performance.now() - t).toBeLessThan(15_000);
      if (HAS_UPLOADS) {
        // an upload while S3 is down: a clear error or a stored file, never a hang or a 500
        const form = new FormData();
        form.set("file", new Blob([loggerCsv("2026-06-02T00:00:00Z", 100)], { type: "text/csv" }), "while-s3-down.csv");
        const res = await fetch(appUrl(`/api/v1/stations/${fixture.station.slug}/uploads`), {
          method: "POST",
          headers: { authorization: `Bearer ${fixture.token}` },
          body: form,
          signal: AbortSignal.timeout(45_000),
        }).catch((err: unknown) => ({ status: -1, text: async () => String(err) }));
        const text = await res.text();
        expect(res.status, text.slice(0, 200)).not.toBe(500);
        expect(res.status, "the upload route answered (not a hang)").not.toBe(-1);
      }
    } finally {
      for (const pid of paused) process.kill(pid, "SIGCONT");
    }
    // back: an upload goes through end to end
    if (HAS_UPLOADS) {
      const id = await uploadFile(fixture.station.slug, fixture.token, loggerCsv("2026-06-03T00:00:00Z", 500));
      const s = await waitFor("import after S3 is back", async () => {
        const u = await uploadState(id, fixture.token);
        return u && ["done", "failed"].includes(u.status) ? u : undefined;
      }, 60_000, 500);
      expect(s.status).toBe("done");
    }
  }, 120_000);
});
