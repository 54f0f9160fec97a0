/**
 * Logger-file uploads (#3) over HTTP against the running app and worker: delimiters, CRLF, BOM,
 * `#` metadata, local time across a DST change, broken lines with their line numbers, the same file
 * twice, token and session credentials, 404 for others, 413 for oversize, and an import interrupted
 * half-way then retried (run in-process with the failAfterChunks hook) against a clean import.
 * Files are invented generic delimited text. Each test makes its own stations, so reruns are clean.
 */
import { randomUUID } from "node:crypto";
import { request } from "node:http";
import { and, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { readings, stations, uploads, users } from "@/db/schema";
import { issueToken } from "@/lib/stations/tokens";
import { storeUpload, type UploadView } from "@/lib/uploads/service";
import { ImportInterrupted, importUpload } from "@/ingest/import-upload";
import { APP_URL, appUrl } from "../helpers/env";
import { anonymous, demoAccount, signInAs, type SessionFetch } from "../helpers/session";

const db = getDb();
const MB = 1024 * 1024;

async function userId(email: string) {
  const [u] = await db.select({ id: users.id }).from(users).where(eq(users.email, email));
  return u!.id;
}

/** A fresh station owned by `ownerEmail`, and a token for it. */
async function makeStation(ownerEmail: string, timeZone = "America/Denver") {
  const slug = `up-test-${randomUUID().slice(0, 8)}`;
  const [st] = await db
    .insert(stations)
    .values({ slug, name: `Upload test ${slug}`, ownerId: await userId(ownerEmail), lat: 39.7, lon: -105.0, timeZone })
    .returning();
  const { token } = await issueToken(db, st!.id, "upload test", null);
  return { ...st!, token };
}

type Reply = { status: number; body: UploadView & { duplicate?: boolean; error?: { code: string; message: string } } };

async function upload(slug: string, text: string, opts: { token?: string; session?: SessionFetch; filename?: string; mapping?: object } = {}): Promise<Reply> {
  const form = new FormData();
  if (opts.mapping) form.append("mapping", JSON.stringify(opts.mapping));
  form.append("file", new Blob([text]), opts.filename ?? "log.txt");
  const path = `/api/v1/stations/${slug}/uploads`;
  const init: RequestInit = { method: "POST", body: form, headers: opts.token ? { authorization: `Bearer ${opts.token}` } : {} };
  const res = opts.session ? await opts.session(path, init) : await fetch(appUrl(path), init);
  return { status: res.status, body: await res.json() };
}

async function getUploadHttp(id: string, auth: { token?: string; session?: SessionFetch }) {
  const path = `/api/v1/uploads/${id}`;
  const init: RequestInit = { headers: auth.token ? { authorization: `Bearer ${auth.token}` } : {} };
  const res = auth.session ? await auth.session(path, init) : await fetch(appUrl(path), init);
  return { status: res.status, body: (await res.json()) as UploadView };
}

/** Polls the API (as the page does) until the import is done or failed. */
async function waitFinished(id: string, token: string, timeoutMs = 60_000): Promise<UploadView> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const { status, body } = await getUploadHttp(id, { token });
    expect(status).toBe(200);
    if (body.status === "done" || body.status === "failed") return body;
    if (Date.now() > until) throw new Error(`upload ${id} still ${body.status} after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 300));
  }
}

async function storedCount(stationId: string, uploadId?: string) {
  const [r] = await db
    .select({ n: sql<number>`count(*)::int` })
    .from(readings)
    .where(uploadId ? and(eq(readings.stationId, stationId), eq(readings.uploadId, uploadId)) : eq(readings.stationId, stationId));
  return r!.n;
}

/** An invented log: `#` metadata, a header, minute readings from `start`, and some broken lines. */
function logFile(d: string, eol: string, start: string, n: number, opts: { bom?: boolean } = {}) {
  const lines = ["# logger: invented test logger", "# location: test bench", ["time (UTC)", "sky brightness", "temperature"].join(d)];
  const t0 = Date.parse(start);
  const dec = (x: number) => (d === ";" ? String(x).replace(".", ",") : String(x));
  for (let i = 0; i < n; i++) lines.push([new Date(t0 + i * 60_000).toISOString().replace(".000Z", "Z"), dec(21 + (i % 50) / 100), dec(-3.5)].join(d));
  lines.push(["2025-01-05T05:00:00Z", "not-a-number", "1"].join(d)); // bad number
  lines.push(["2025-01-05T05:00:00Z", "21.5"].join(d)); // too few fields
  lines.push(["yesterday", "21.5", "1"].join(d)); // bad time
  lines.push(["2025-01-05T05:00:00Z", "30", "1"].join(d)); // impossible brightness
  return (opts.bom ? "\uFEFF" : "") + lines.join(eol) + eol;
}

let volunteer: SessionFetch;
let volunteer2: SessionFetch;
let advocate: SessionFetch;

beforeAll(async () => {
  const v1 = demoAccount("volunteer");
  volunteer = await signInAs(v1.email, v1.password);
  volunteer2 = await signInAs("volunteer2@demo.nightmark.example", "night-volunteer-2026");
  const adv = demoAccount("advocate");
  advocate = await signInAs(adv.email, adv.password);
});

describe("formats", () => {
  for (const [name, d] of [["comma", ","], ["semicolon", ";"], ["tab", "\t"]] as const) {
    it(`imports a ${name}-separated CRLF file with a BOM and # lines, reporting broken lines by number`, async () => {
      const st = await makeStation(demoAccount("volunteer").email);
      const text = logFile(d, "\r\n", "2025-01-05T04:00:00Z", 30, { bom: true });
      const r = await upload(st.slug, text, { token: st.token, filename: `night.${name}.txt` });
      expect(r.status).toBe(202);
      expect(["queued", "importing", "done"]).toContain(r.body.status);
      expect(r.body.metadata).toEqual({ logger: "invented test logger", location: "test bench" });
      expect(r.body.mapping).toMatchObject({ delimiter: d, timeColumn: "time (UTC)", timeZone: "UTC", magColumn: "sky brightness", tempColumn: "temperature" });
      const done = await waitFinished(r.body.id, st.token);
      expect(done.status).toBe("done");
      expect(done).toMatchObject({ rowsRead: 34, accepted: 30, duplicates: 0, rejectedCount: 4, bytesProcessed: done.sizeBytes });
      // Lines: 1–2 metadata, 3 header, 4–33 readings, 34–37 broken.
      expect(done.rejections.map((x) => x.line)).toEqual([34, 35, 36, 37]);
      expect(done.rejections[0]!.reason).toMatch(/brightness "not-a-number" \("sky brightness"\) is not a number/);
      expect(done.rejections[1]!.reason).toMatch(/2 fields where the header has 3/);
      expect(done.rejections[2]!.reason).toMatch(/time "yesterday" is not a date-time/);
      expect(done.rejections[3]!.reason).toMatch(/mag 30 is darker than 24/);
      expect(await storedCount(st.id, r.body.id)).toBe(30);
      const [first] = await db.select().from(readings).where(and(eq(readings.stationId, st.id), eq(readings.takenAt, new Date("2025-01-05T04:00:00Z"))));
      expect(first).toMatchObject({ mag: 21, tempC: -3.5, source: "upload", uploadId: r.body.id });
    });
  }

  it("reads a local-time column in the chosen zone across the spring-forward change (America/Denver, 2024-03-10)", async () => {
    // US DST starts 02:00 local on the second Sunday of March (15 U.S.C. § 260a); Denver is UTC−7 → UTC−6.
    const st = await makeStation(demoAccount("volunteer").email);
    const text = [
      "# clock: local",
      "UTC time,local time,mag",
      "2024-03-10T08:58:00Z,2024-03-10 01:58:00,21.4",
      "2024-03-10T08:59:00Z,2024-03-10 01:59:00,21.4",
      ",2024-03-10 02:00:00,21.4",
      ",2024-03-10 02:30:00,21.4",
      "2024-03-10T09:00:00Z,2024-03-10 03:00:00,21.4",
      "2024-11-03T07:30:00Z,2024-11-03 01:30:00,21.4",
    ].join("\n");
    const r = await upload(st.slug, text, { token: st.token, mapping: { timeColumn: "local time", timeZone: "America/Denver", magColumn: "mag" } });
    expect(r.status).toBe(202);
    expect(r.body.mapping).toMatchObject({ timeColumn: "local time", timeZone: "America/Denver" });
    const done = await waitFinished(r.body.id, st.token);
    expect(done).toMatchObject({ status: "done", rowsRead: 6, accepted: 4, rejectedCount: 2 });
    expect(done.rejections).toEqual([
      { line: 5, reason: 'time "2024-03-10 02:00:00" does not exist in America/Denver (DST change)' },
      { line: 6, reason: 'time "2024-03-10 02:30:00" does not exist in America/Denver (DST change)' },
    ]);
    const rows = await db.select({ t: readings.takenAt }).from(readings).where(eq(readings.stationId, st.id)).orderBy(readings.takenAt);
    // Each local time lands on the instant of its UTC column; the repeated 01:30 in November takes the earlier (MDT) instant.
    expect(rows.map((x) => x.t.toISOString())).toEqual([
      "2024-03-10T08:58:00.000Z",
      "2024-03-10T08:59:00.000Z",
      "2024-03-10T09:00:00.000Z",
      "2024-11-03T07:30:00.000Z",
    ]);
  });

  it("refuses a file that is not a delimited log, and a mapping naming a missing column, with 422", async () => {
    const st = await makeStation(demoAccount("volunteer").email);
    const r1 = await upload(st.slug, "# only a comment\n\n", { token: st.token });
    expect(r1.status).toBe(422);
    expect(r1.body.error!.message).toMatch(/cannot be read as a delimited log/);
    const r2 = await upload(st.slug, "time,mag\n2025-01-05T05:00:00Z,21.5\n", { token: st.token, mapping: { magColumn: "brightness" } });
    expect(r2.status).toBe(422);
    expect(r2.body.error!.message).toMatch(/brightness column "brightness" is not in the file/);
    const [{ n }] = (await db.select({ n: sql<number>`count(*)::int` }).from(uploads).where(eq(uploads.stationId, st.id))) as [{ n: number }];
    expect(n).toBe(0);
  });
});

describe("the same file twice", () => {
  it("answers 200 with the existing upload instead of importing it again", async () => {
    const st = await makeStation(demoAccount("volunteer").email);
    const text = logFile(",", "\n", "2025-02-01T04:00:00Z", 10);
    const first = await upload(st.slug, text, { token: st.token, filename: "a.csv" });
    expect(first.status).toBe(202);
    await waitFinished(first.body.id, st.token);
    const again = await upload(st.slug, text, { session: volunteer, filename: "renamed.csv" });
    expect(again.status).toBe(200);
    expect(again.body).toMatchObject({ id: first.body.id, duplicate: true, filename: "a.csv", status: "done" });
    const [{ n }] = (await db.select({ n: sql<number>`count(*)::int` }).from(uploads).where(eq(uploads.stationId, st.id))) as [{ n: number }];
    expect(n).toBe(1);
    expect(await storedCount(st.id)).toBe(10);
  });
});

describe("credentials", () => {
  it("takes a signed-in owner's upload and shows it to them, to nobody else (404)", async () => {
    const st = await makeStation(demoAccount("volunteer").email);
    const r = await upload(st.slug, logFile("\t", "\n", "2025-03-01T04:00:00Z", 5), { session: volunteer });
    expect(r.status).toBe(202);
    expect((await getUploadHttp(r.body.id, { session: volunteer })).status).toBe(200);
    expect((await getUploadHttp(r.body.id, { token: st.token })).status).toBe(200);
    expect((await getUploadHttp(r.body.id, { session: volunteer2 })).status).toBe(404);
    expect((await getUploadHttp(r.body.id, { session: advocate })).status).toBe(404);
    const other = await makeStation("volunteer2@demo.nightmark.example");
    expect((await getUploadHttp(r.body.id, { token: other.token })).status).toBe(404);
    expect((await getUploadHttp(r.body.id, { session: anonymous() })).status).toBe(401);
    // Retrying someone else's upload looks the same as a missing one.
    expect((await volunteer2(`/api/v1/uploads/${r.body.id}/retry`, { method: "POST" })).status).toBe(404);
  });

  it("refuses uploads to a station the caller may not manage, or with another station's token", async () => {
    const mine = await makeStation(demoAccount("volunteer").email);
    const theirs = await makeStation("volunteer2@demo.nightmark.example");
    const text = logFile(",", "\n", "2025-03-02T04:00:00Z", 3);
    expect((await upload(mine.slug, text, { session: volunteer2 })).status).toBe(404);
    expect((await upload(mine.slug, text, { token: theirs.token })).status).toBe(404);
    expect((await upload(mine.slug, text, { token: "nmk_not-a-real-token" })).status).toBe(401);
    expect((await upload(mine.slug, text)).status).toBe(401);
    const [{ n }] = (await db.select({ n: sql<number>`count(*)::int` }).from(uploads).where(eq(uploads.stationId, mine.id))) as [{ n: number }];
    expect(n).toBe(0);
  });

  it("previews the first bytes of a file for a token", async () => {
    const st = await makeStation(demoAccount("volunteer").email);
    const res = await fetch(appUrl(`/api/v1/stations/${st.slug}/uploads/preview`), {
      method: "POST",
      headers: { authorization: `Bearer ${st.token}`, "x-complete-file": "true" },
      body: "# a: b\nlocal,mag\n2025-01-05 22:00:00,21.5\n",
    });
    expect(res.status).toBe(200);
    expect(await res.json()).toMatchObject({ delimiter: ",", metadata: { a: "b" }, columns: ["local", "mag"], guessedMapping: { timeColumn: "local", timeZone: "America/Denver", magColumn: "mag" } });
  });
});

/** A raw HTTP request, so the test controls Content-Length and chunking. */
function rawPost(path: string, headers: Record<string, string>, write: (req: ReturnType<typeof request>) => Promise<void>): Promise<{ status: number; body: string }> {
  return new Promise((resolve, reject) => {
    const u = new URL(path, APP_URL);
    const req = request({ host: u.hostname, port: u.port, path: u.pathname, method: "POST", headers }, (res) => {
      let body = "";
      res.setEncoding("utf8");
      res.on("data", (c) => (body += c));
      res.on("end", () => resolve({ status: res.statusCode ?? 0, body }));
    });
    req.on("error", (err) => reject(err));
    write(req).catch(() => {});
  });
}

describe("size limit", () => {
  it("answers 413 from Content-Length before reading the body", async () => {
    const st = await makeStation(demoAccount("volunteer").email);
    const started = Date.now();
    const r = await rawPost(
      `/api/v1/stations/${st.slug}/uploads`,
      { authorization: `Bearer ${st.token}`, "content-type": "multipart/form-data; boundary=x", "content-length": String(70 * MB) },
      async (req) => {
        req.write("--x\r\n"); // and never the rest
      },
    );
    expect(r.status).toBe(413);
    expect(JSON.parse(r.body).error.code).toBe("payload_too_large");
    expect(Date.now() - started).toBeLessThan(10_000);
  });

  it("answers 413 while streaming a file over 60 MiB sent without a length, and keeps nothing", async () => {
    const st = await makeStation(demoAccount("volunteer").email);
    const boundary = "----nmtest";
    const r = await rawPost(
      `/api/v1/stations/${st.slug}/uploads`,
      { authorization: `Bearer ${st.token}`, "content-type": `multipart/form-data; boundary=${boundary}`, "transfer-encoding": "chunked" },
      async (req) => {
        req.write(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="big.csv"\r\nContent-Type: text/plain\r\n\r\ntime,mag\n`);
        const line = "2025-01-05T05:00:00Z,21.50\n".repeat(40_000); // ~1.1 MB
        for (let sent = 0; sent < 62 * MB && !req.destroyed; sent += line.length) {
          if (!req.write(line)) await new Promise((res) => req.once("drain", res));
        }
        req.end(`\r\n--${boundary}--\r\n`);
      },
    ).catch((err: Error) => ({ status: -1, body: err.message }));
    expect(r.status).toBe(413);
    const [{ n }] = (await db.select({ n: sql<number>`count(*)::int` }).from(uploads).where(eq(uploads.stationId, st.id))) as [{ n: number }];
    expect(n).toBe(0);
  });
});

describe("an import interrupted half-way", () => {
  it("is retried to the same totals as a clean import, storing every reading exactly once", async () => {
    const owner = demoAccount("volunteer").email;
    const a = await makeStation(owner);
    const b = await makeStation(owner);
    // 12,000 rows in chunks of 2,500 (5 chunks), with broken lines, a time repeated in the file in a
    // later chunk, and 100 readings both stations already had from the token POST (true duplicates).
    const lines = ["# logger: invented", "time,mag,temp"];
    const t0 = Date.parse("2025-04-01T00:00:00Z");
    for (let i = 0; i < 12_000; i++) {
      if (i % 1000 === 999) lines.push(`broken line ${i}`);
      else if (i === 6000) lines.push(`${new Date(t0).toISOString()},21.0,1.0`); // repeat of row 0
      else lines.push(`${new Date(t0 + i * 60_000).toISOString()},${(20 + (i % 100) / 100).toFixed(2)},1.0`);
    }
    const text = lines.join("\n") + "\n";
    const pre = Array.from({ length: 100 }, (_, i) => ({ takenAt: new Date(t0 + (2000 + i) * 60_000).toISOString(), mag: 19.5 }));
    for (const st of [a, b]) {
      const res = await fetch(appUrl("/api/v1/readings"), {
        method: "POST",
        headers: { authorization: `Bearer ${st.token}`, "content-type": "application/json" },
        body: JSON.stringify({ readings: pre }),
      });
      expect((await res.json()).accepted).toBe(100);
    }

    // Station A: stored, imported in-process with a failure after the first chunk, retried over HTTP.
    const stored = await storeUpload({ db, station: a, caller: { actorId: null, via: "token" }, filename: "year.csv", body: [Buffer.from(text)], queue: false });
    expect(stored.upload.status).toBe("stored");
    await expect(importUpload(stored.upload.id, { chunkRows: 2500, failAfterChunks: 1 })).rejects.toBeInstanceOf(ImportInterrupted);
    const failed = (await getUploadHttp(stored.upload.id, { token: a.token })).body;
    expect(failed.status).toBe("failed");
    expect(failed.error).toMatch(/interrupted after 1 chunk/);
    expect(failed.rowsRead).toBe(2500); // the committed chunk and its counters, together
    expect(failed.accepted + failed.duplicates + failed.rejectedCount).toBe(2500);
    expect(await storedCount(a.id, stored.upload.id)).toBe(failed.accepted);

    const retry = await fetch(appUrl(`/api/v1/uploads/${stored.upload.id}/retry`), { method: "POST", headers: { authorization: `Bearer ${a.token}` } });
    expect(retry.status).toBe(202);
    const retried = await waitFinished(stored.upload.id, a.token);

    // Station B: the same file uploaded over HTTP and imported cleanly by the worker.
    const clean = await upload(b.slug, text, { token: b.token, filename: "year.csv" });
    expect(clean.status).toBe(202);
    const cleanDone = await waitFinished(clean.body.id, b.token);

    const totals = (u: UploadView) => ({ status: u.status, rowsRead: u.rowsRead, accepted: u.accepted, duplicates: u.duplicates, rejectedCount: u.rejectedCount, rejections: u.rejections });
    expect(totals(retried)).toEqual(totals(cleanDone));
    expect(retried.attempts).toBe(2);
    // 12,000 lines: 12 broken, 1 repeat, 100 already stored → 11,887 new readings.
    expect(totals(retried)).toMatchObject({ status: "done", rowsRead: 12_000, rejectedCount: 12, duplicates: 101, accepted: 11_887 });
    expect(retried.rejections[0]).toEqual({ line: 1002, reason: "1 field where the header has 3 (comma-separated)" });
    // Exactly once in the database: the upload's readings plus the 100 posted before.
    expect(await storedCount(a.id, stored.upload.id)).toBe(11_887);
    expect(await storedCount(a.id)).toBe(11_987);
    expect(await storedCount(b.id)).toBe(11_987);

    const again = await fetch(appUrl(`/api/v1/uploads/${stored.upload.id}/retry`), { method: "POST", headers: { authorization: `Bearer ${a.token}` } });
    expect(again.status).toBe(409);
  });
});
