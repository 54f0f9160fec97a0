/**
 * Ingest throughput against a running app and its database (issues #3 and #8).
 *   APP_URL=http://127.0.0.1:3000 DATABASE_URL=postgres://… npx tsx scripts/bench/ingest.ts   (npm run bench:ingest)
 *
 * In one run:
 *  1. token POST: CLIENTS fresh bench stations, one token each (issueToken), readings from the model
 *     (db/seed/model.ts), CLIENTS concurrent clients each posting BATCHES JSON batches of 1,000
 *     (screening and night marking included, as in production). One station per client because a
 *     token is limited to TOKEN_RATE_PER_MIN requests a minute (lib/auth/rate-limit.ts).
 *  2. bare COPY (pg-copy-streams, one stream) of the same rows, pre-screened, into readings for as
 *     many other fresh stations: the ceiling for any ingest path (STACK.md: 370–400k rows/s).
 *  3. a one-year minute-cadence logger file (~525k rows: the model's night readings, daylight values
 *     by day) through the upload path when the app has it (POST /api/v1/stations/{slug}/uploads with
 *     the token, then GET /api/v1/uploads/{id} until done), otherwise through the token POST in CSV
 *     bodies of 10,000 rows; seconds until imported, screened and summarised (dirty_nights empty).
 *     Peak RSS of the web and worker process trees is sampled every 100 ms during the whole run.
 * Prints a table and, as its last line, JSON. Removes every bench row afterwards.
 * Targets: POST ≥ 40 % of COPY; year file < 30 s; each process < 400 MB.
 */
import { randomBytes } from "node:crypto";
import { existsSync } from "node:fs";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import pg from "pg";
import { from as copyFrom } from "pg-copy-streams";
import { pipeline } from "node:stream/promises";
import { Readable } from "node:stream";
import { createSkyCache, screenBatch, skyAt } from "../../ingest/screening/sky-positions";
import { addDays } from "../../ingest/night";
import { simulateStationRange, type SimReading } from "../../db/seed/model";
import { findWebPid, findWorkerPid, sampleRss } from "./proc";

export const TARGETS = { postToCopyRatio: 0.4, yearFileSeconds: 30, peakRssMb: 400 } as const;

export type IngestFigures = {
  postReadingsPerSec: number;
  copyReadingsPerSec: number;
  postToCopyRatio: number;
  yearFileSeconds: number | null;
  webPeakRssMb: number | null;
  workerPeakRssMb: number | null;
  yearFilePath: "upload" | "post-csv";
  notes: string[];
  postReadings: number;
  copyReadings: number;
  yearFileRows: number;
  postP50Ms: number;
  postP95Ms: number;
};

type BenchStation = { id: string; slug: string; lat: number; lon: number; timeZone: string; token?: string; tokenId?: string };

const ROOT = join(import.meta.dirname, "..", "..");
const BATCH = 1000;
const TZ = "America/Denver";

function pct(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN;
  const i = (sorted.length - 1) * p;
  const lo = Math.floor(i);
  const hi = Math.ceil(i);
  return sorted[lo]! + (sorted[hi]! - sorted[lo]!) * (i - lo);
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const today = () => new Date().toISOString().slice(0, 10);

/** Readings from the model for one station: the first `count` of the nights from fromNight on. */
function modelReadings(st: BenchStation, seed: number, fromNight: string, toNight: string, count: number): SimReading[] {
  const out: SimReading[] = [];
  for (const { readings } of simulateStationRange({
    station: { lat: st.lat, lon: st.lon, timeZone: st.timeZone },
    seed,
    baseMag: 20.6 + (seed % 10) / 10,
    startDate: fromNight,
    fromNight,
    toNight,
    cadenceMin: 1,
  })) {
    out.push(...readings);
    if (out.length >= count) break;
  }
  return out.slice(0, count);
}

async function createStations(client: pg.PoolClient, ownerId: string, run: string, kind: string, n: number): Promise<BenchStation[]> {
  const out: BenchStation[] = [];
  for (let i = 0; i < n; i++) {
    // Spread over the demo region (Colorado Plateau) so altitudes differ a little per station.
    const lat = 36.5 + (i % 4) * 0.6;
    const lon = -112 + Math.floor(i / 4) * 0.7;
    const slug = `bench-${run}-${kind}-${i}`;
    const r = await client.query<{ id: string }>(
      `INSERT INTO stations (slug, name, owner_id, lat, lon, time_zone) VALUES ($1, $2, $3, $4, $5, $6) RETURNING id`,
      [slug, `Bench ${kind} ${i}`, ownerId, lat, lon, TZ],
    );
    out.push({ id: r.rows[0]!.id, slug, lat, lon, timeZone: TZ });
  }
  return out;
}

async function waitDirtyEmpty(db: pg.Pool, stationIds: string[], timeoutMs: number): Promise<boolean> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const r = await db.query<{ n: number }>(`SELECT count(*)::int AS n FROM dirty_nights WHERE station_id = ANY($1::uuid[])`, [stationIds]);
    if (r.rows[0]!.n === 0) return true;
    if (Date.now() > deadline) return false;
    await sleep(100);
  }
}

/** POST with bounded retries on 429/503 (honouring Retry-After). */
async function postBatch(appUrl: string, token: string, body: string, type: string, stats: { retries: number; errors: string[] }) {
  for (let attempt = 0; attempt < 6; attempt++) {
    const t = performance.now();
    const res = await fetch(`${appUrl}/api/v1/readings`, {
      method: "POST",
      headers: { authorization: `Bearer ${token}`, "content-type": type },
      body,
      signal: AbortSignal.timeout(60_000),
    });
    const ms = performance.now() - t;
    const text = await res.text();
    if (res.status === 200) return { ms, reply: JSON.parse(text) as { accepted: number; duplicates: number; rejected: unknown[] } };
    if (res.status === 429 || res.status === 503) {
      stats.retries++;
      await sleep(Math.min(10, Number(res.headers.get("retry-after") ?? 1)) * 1000);
      continue;
    }
    stats.errors.push(`HTTP ${res.status}: ${text.slice(0, 200)}`);
    return { ms, reply: null };
  }
  stats.errors.push("gave up after 6 attempts (429/503)");
  return { ms: 0, reply: null };
}

const copyLine = (stationId: string, r: SimReading, s: { sunAltDeg: number; moonAltDeg: number; moonFraction: number; flags: number }) =>
  `${stationId}\t${r.takenAt.toISOString()}\t${r.mag}\t${r.tempC}\t${s.sunAltDeg}\t${s.moonAltDeg}\t${s.moonFraction}\t${s.flags}\tseed\t\\N\n`;

/** The one-year minute-cadence logger file: the model at night, a bright daylight value by day. */
function yearFileCsv(st: BenchStation, seed: number, fromNight: string, toNight: string): { csv: string; rows: number } {
  const cache = createSkyCache({ stepMin: 10, maxKnots: 100_000 });
  const night = new Map<number, SimReading>();
  for (const { readings } of simulateStationRange({
    station: st, seed, baseMag: 21.2, startDate: fromNight, fromNight, toNight, cadenceMin: 1, cache,
  })) for (const r of readings) night.set(r.takenAt.getTime(), r);
  const start = Date.parse(`${fromNight}T19:00:00Z`); // local noon in Denver (UTC−7)
  const end = Date.parse(`${addDays(toNight, 1)}T19:00:00Z`);
  const parts: string[] = ["# logger: bench one-year file\n# cadence: 1 min\ntakenAt,mag,tempC\n"];
  let rows = 0;
  for (let t = start; t < end; t += 60_000) {
    const r = night.get(t);
    if (r) parts.push(`${r.takenAt.toISOString()},${r.mag},${r.tempC}\n`);
    else {
      // A sky meter by day reads a saturated, very bright sky.
      const sun = skyAt(cache, new Date(t), st.lat, st.lon).sunAltDeg;
      const mag = Math.max(0.5, Math.min(12, 25 - 1.1 * (sun + 18)));
      parts.push(`${new Date(t).toISOString()},${mag.toFixed(2)},20.0\n`);
    }
    rows++;
  }
  return { csv: parts.join(""), rows };
}

async function uploadYearFile(appUrl: string, st: BenchStation, csv: string, notes: string[]): Promise<string | null> {
  const form = new FormData();
  form.set("file", new Blob([csv], { type: "text/csv" }), "bench-year.csv");
  form.set("mapping", JSON.stringify({ delimiter: ",", timeColumn: "takenAt", timeZone: "UTC", magColumn: "mag", tempColumn: "tempC" }));
  const res = await fetch(`${appUrl}/api/v1/stations/${st.slug}/uploads`, {
    method: "POST",
    headers: { authorization: `Bearer ${st.token}` },
    body: form,
    signal: AbortSignal.timeout(120_000),
  });
  const text = await res.text();
  if (!res.ok) {
    notes.push(`upload route answered ${res.status}: ${text.slice(0, 160)}; year file went through the token POST instead`);
    return null;
  }
  const body = JSON.parse(text) as { id?: string; upload?: { id?: string } };
  return body.id ?? body.upload?.id ?? null;
}

async function waitUploadDone(appUrl: string, st: BenchStation, id: string, timeoutMs: number): Promise<string> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const res = await fetch(`${appUrl}/api/v1/uploads/${id}`, { headers: { authorization: `Bearer ${st.token}` } });
    const body = (await res.json().catch(() => ({}))) as { status?: string; upload?: { status?: string } };
    const status = body.status ?? body.upload?.status ?? `HTTP ${res.status}`;
    if (status === "done" || status === "failed") return status;
    if (Date.now() > deadline) return `timeout (${status})`;
    await sleep(200);
  }
}

export async function runIngestBench(opts: { appUrl: string; databaseUrl: string; log?: (s: string) => void }): Promise<IngestFigures> {
  const log = opts.log ?? ((s: string) => console.log(s));
  const CLIENTS = Number(process.env.BENCH_CLIENTS ?? 8);
  const BATCHES = Math.min(100, Number(process.env.BENCH_BATCHES ?? 50)); // per client; 120/min token limit
  const notes: string[] = [];
  const run = randomBytes(3).toString("hex");
  const db = new pg.Pool({ connectionString: opts.databaseUrl, max: 4 });
  // issueToken uses the app's db module, which reads DATABASE_URL once.
  process.env.DATABASE_URL = opts.databaseUrl;
  const { issueToken } = await import("../../lib/stations/tokens");
  const { getDb, pool: appPool } = await import("../../db");

  const webPid = findWebPid(opts.appUrl);
  const workerPid = findWorkerPid(opts.databaseUrl, ROOT);
  if (!webPid) notes.push("web process not found (set WEB_PID): no RSS figure");
  if (!workerPid) notes.push("worker process not found (set WORKER_PID): no RSS figure");
  log(`bench run ${run}: app ${opts.appUrl} (pid ${webPid ?? "?"}), worker pid ${workerPid ?? "?"}`);
  const rss = sampleRss({ web: webPid, worker: workerPid });

  const client = await db.connect();
  const stationIds: string[] = [];
  const tokenIds: string[] = [];
  let ownerId = "";
  try {
    const owner = await client.query<{ id: string }>(
      `INSERT INTO users (email, name, role) VALUES ($1, $2, 'volunteer') RETURNING id`,
      [`bench-${run}@bench.invalid`, `Bench ${run}`],
    );
    ownerId = owner.rows[0]!.id;
    const postStations = await createStations(client, ownerId, run, "post", CLIENTS);
    const copyStations = await createStations(client, ownerId, run, "copy", CLIENTS);
    const [yearStation] = await createStations(client, ownerId, run, "year", 1);
    for (const s of [...postStations, ...copyStations, yearStation!]) stationIds.push(s.id);
    for (const s of [...postStations, yearStation!]) {
      const t = await issueToken(getDb(), s.id, `bench ${run}`, null);
      s.token = t.token;
      s.tokenId = t.id;
      tokenIds.push(t.id);
    }

    // ---- 1. token POST -------------------------------------------------------------------------
    const perClient = BATCHES * BATCH;
    const toNight = addDays(today(), -3);
    const fromNight = addDays(toNight, -Math.ceil(perClient / 400) - 10);
    let t = performance.now();
    const data = postStations.map((s, i) => modelReadings(s, 1000 + i, fromNight, toNight, perClient));
    log(`generated ${CLIENTS} × ${perClient} model readings in ${((performance.now() - t) / 1000).toFixed(1)} s`);
    const bodies = data.map((rows) => {
      const list: string[] = [];
      for (let b = 0; b < rows.length; b += BATCH)
        list.push(JSON.stringify({ readings: rows.slice(b, b + BATCH).map((r) => ({ takenAt: r.takenAt.toISOString(), mag: r.mag, tempC: r.tempC })) }));
      return list;
    });
    const stats = { retries: 0, errors: [] as string[] };
    const latencies: number[] = [];
    let accepted = 0;
    let sent = 0;
    const deadline = Date.now() + 180_000;
    t = performance.now();
    await Promise.all(
      postStations.map(async (s, i) => {
        for (const body of bodies[i]!) {
          if (Date.now() > deadline) break;
          const r = await postBatch(opts.appUrl, s.token!, body, "application/json", stats);
          latencies.push(r.ms);
          if (r.reply) {
            accepted += r.reply.accepted;
            sent += BATCH;
          }
        }
      }),
    );
    const postSec = (performance.now() - t) / 1000;
    const postReadingsPerSec = accepted / postSec;
    latencies.sort((a, b) => a - b);
    if (stats.errors.length) notes.push(`POST errors: ${stats.errors.slice(0, 3).join(" | ")}`);
    if (stats.retries) notes.push(`POST: ${stats.retries} replies were 429/503 and retried`);
    if (accepted !== CLIENTS * perClient) notes.push(`POST stored ${accepted} of ${CLIENTS * perClient} readings`);
    log(`POST: ${accepted} readings in ${postSec.toFixed(2)} s = ${Math.round(postReadingsPerSec)} readings/s (p50 ${pct(latencies, 0.5).toFixed(0)} ms, p95 ${pct(latencies, 0.95).toFixed(0)} ms per batch)`);
    const drained = await waitDirtyEmpty(db, postStations.map((s) => s.id), 120_000);
    if (!drained) notes.push("the worker had not summarised the POST nights after 120 s");

    // ---- 2. bare COPY of the same rows -----------------------------------------------------------
    const cache = createSkyCache({ maxKnots: 400_000 });
    const lines: string[] = [];
    copyStations.forEach((s, i) => {
      const rows = data[i]!;
      const screened = screenBatch(cache, { latDeg: s.lat, lonDeg: s.lon }, rows, {});
      rows.forEach((r, j) => lines.push(copyLine(s.id, r, screened[j]!)));
    });
    const CHUNK = 5000;
    t = performance.now();
    const copyStream = client.query(
      copyFrom(`COPY readings (station_id, taken_at, mag, temp_c, sun_alt_deg, moon_alt_deg, moon_fraction, flags, source, upload_id) FROM STDIN`),
    );
    await pipeline(
      Readable.from((function* () {
        for (let k = 0; k < lines.length; k += CHUNK) yield lines.slice(k, k + CHUNK).join("");
      })()),
      copyStream,
    );
    const copySec = (performance.now() - t) / 1000;
    const copyReadingsPerSec = lines.length / copySec;
    log(`COPY: ${lines.length} readings in ${copySec.toFixed(2)} s = ${Math.round(copyReadingsPerSec)} readings/s`);

    // ---- 3. one-year logger file -----------------------------------------------------------------
    const yToNight = addDays(today(), -3);
    const yFromNight = addDays(yToNight, -364);
    t = performance.now();
    const { csv, rows: yearRows } = yearFileCsv(yearStation!, 77, yFromNight, yToNight);
    log(`generated the year file: ${yearRows} rows, ${(csv.length / 1e6).toFixed(1)} MB in ${((performance.now() - t) / 1000).toFixed(1)} s`);
    let yearFilePath: IngestFigures["yearFilePath"] = "post-csv";
    let yearFileSeconds: number | null = null;
    const hasUploads = existsSync(join(ROOT, "app", "api", "v1", "stations", "[slug]", "uploads", "route.ts"));
    t = performance.now();
    let uploaded = false;
    if (hasUploads) {
      const id = await uploadYearFile(opts.appUrl, yearStation!, csv, notes);
      if (id) {
        const status = await waitUploadDone(opts.appUrl, yearStation!, id, 300_000);
        if (status !== "done") notes.push(`upload ended as ${status}`);
        yearFilePath = "upload";
        uploaded = true;
      }
    } else notes.push("no upload route yet (app/api/v1/stations/[slug]/uploads): the year file went through the token POST as CSV bodies of 10,000 rows");
    if (!uploaded) {
      const body = csv.split("\n").filter((l) => l && !l.startsWith("#"));
      const header = body.shift()!;
      const yStats = { retries: 0, errors: [] as string[] };
      for (let k = 0; k < body.length; k += 10_000) {
        const r = await postBatch(opts.appUrl, yearStation!.token!, `${header}\n${body.slice(k, k + 10_000).join("\n")}\n`, "text/csv", yStats);
        if (!r.reply) break;
      }
      if (yStats.errors.length) notes.push(`year file POST errors: ${yStats.errors.slice(0, 2).join(" | ")}`);
    }
    const summarised = await waitDirtyEmpty(db, [yearStation!.id], 300_000);
    yearFileSeconds = (performance.now() - t) / 1000;
    if (!summarised) notes.push("year file: nights still unsummarised after 300 s");
    const stored = await db.query<{ n: number }>(`SELECT count(*)::int AS n FROM readings WHERE station_id = $1`, [yearStation!.id]);
    if (stored.rows[0]!.n !== yearRows) notes.push(`year file: ${stored.rows[0]!.n} of ${yearRows} rows stored`);
    log(`year file: ${stored.rows[0]!.n} rows imported, screened and summarised in ${yearFileSeconds.toFixed(1)} s (${yearFilePath})`);

    const peaks = rss.stop();
    return {
      postReadingsPerSec: Math.round(postReadingsPerSec),
      copyReadingsPerSec: Math.round(copyReadingsPerSec),
      postToCopyRatio: Math.round((postReadingsPerSec / copyReadingsPerSec) * 1000) / 1000,
      yearFileSeconds: Math.round(yearFileSeconds * 10) / 10,
      webPeakRssMb: peaks.web ?? null,
      workerPeakRssMb: peaks.worker ?? null,
      yearFilePath,
      notes,
      postReadings: accepted,
      copyReadings: lines.length,
      yearFileRows: yearRows,
      postP50Ms: Math.round(pct(latencies, 0.5)),
      postP95Ms: Math.round(pct(latencies, 0.95)),
    };
  } finally {
    rss.stop();
    // Clean up every bench row, whatever happened above.
    const t = performance.now();
    await client.query(`DELETE FROM readings WHERE station_id = ANY($1::uuid[])`, [stationIds]).catch((e) => log(`cleanup readings: ${e.message}`));
    await client.query(`DELETE FROM dirty_nights WHERE station_id = ANY($1::uuid[])`, [stationIds]).catch(() => {});
    await client.query(`DELETE FROM uploads WHERE station_id = ANY($1::uuid[])`, [stationIds]).catch(() => {});
    await client.query(`DELETE FROM audit_log WHERE entity_id = ANY($1::text[])`, [tokenIds]).catch(() => {});
    await client.query(`DELETE FROM rate_limits WHERE key = ANY($1::text[])`, [tokenIds.map((id) => `token:${id}`)]).catch(() => {});
    await client.query(`DELETE FROM stations WHERE id = ANY($1::uuid[])`, [stationIds]).catch((e) => log(`cleanup stations: ${e.message}`));
    if (ownerId) await client.query(`DELETE FROM users WHERE id = $1`, [ownerId]).catch((e) => log(`cleanup user: ${e.message}`));
    client.release();
    await db.end();
    await appPool().end().catch(() => {});
    log(`bench rows removed in ${((performance.now() - t) / 1000).toFixed(1)} s`);
  }
}

export function ingestVerdicts(f: IngestFigures): { line: string; met: boolean }[] {
  const yes = (ok: boolean) => (ok ? "met" : "MISSED");
  const rssOk = (mb: number | null) => mb !== null && mb < TARGETS.peakRssMb;
  return [
    { met: f.postToCopyRatio >= TARGETS.postToCopyRatio, line: `POST/COPY ${(f.postToCopyRatio * 100).toFixed(0)} % (target ≥ 40 %): ${yes(f.postToCopyRatio >= TARGETS.postToCopyRatio)}` },
    { met: f.yearFileSeconds !== null && f.yearFileSeconds < TARGETS.yearFileSeconds, line: `year file ${f.yearFileSeconds ?? "—"} s (target < 30 s): ${yes(f.yearFileSeconds !== null && f.yearFileSeconds < TARGETS.yearFileSeconds)}` },
    { met: rssOk(f.webPeakRssMb), line: `web peak RSS ${f.webPeakRssMb ?? "—"} MB (target < 400 MB): ${f.webPeakRssMb === null ? "not measured" : yes(rssOk(f.webPeakRssMb))}` },
    { met: rssOk(f.workerPeakRssMb), line: `worker peak RSS ${f.workerPeakRssMb ?? "—"} MB (target < 400 MB): ${f.workerPeakRssMb === null ? "not measured" : yes(rssOk(f.workerPeakRssMb))}` },
  ];
}

export function ingestTable(f: IngestFigures): string {
  const rows = [
    ["token POST (8 clients, 1,000/batch)", `${f.postReadingsPerSec.toLocaleString("en")} readings/s`, `${f.postReadings.toLocaleString("en")} readings; batch p50 ${f.postP50Ms} ms, p95 ${f.postP95Ms} ms`],
    ["bare COPY (1 stream)", `${f.copyReadingsPerSec.toLocaleString("en")} readings/s`, `${f.copyReadings.toLocaleString("en")} readings`],
    ["POST / COPY", `${(f.postToCopyRatio * 100).toFixed(1)} %`, "target ≥ 40 %"],
    [`year file (${f.yearFilePath})`, `${f.yearFileSeconds ?? "—"} s`, `${f.yearFileRows.toLocaleString("en")} rows; target < 30 s`],
    ["web peak RSS", `${f.webPeakRssMb ?? "—"} MB`, "target < 400 MB"],
    ["worker peak RSS", `${f.workerPeakRssMb ?? "—"} MB`, "target < 400 MB"],
  ];
  const w = [0, 1, 2].map((c) => Math.max(...rows.map((r) => r[c]!.length)));
  return rows.map((r) => r.map((c, i) => c.padEnd(w[i]!)).join("  ")).join("\n");
}

async function main() {
  const appUrl = process.env.APP_URL ?? "http://127.0.0.1:3000";
  const databaseUrl = process.env.DATABASE_URL ?? "postgres://postgres@127.0.0.1:54329/nightmark";
  const t0 = Date.now();
  const f = await runIngestBench({ appUrl, databaseUrl });
  console.log("");
  console.log(ingestTable(f));
  for (const v of ingestVerdicts(f)) console.log(v.line);
  for (const n of f.notes) console.log(`note: ${n}`);
  console.log(`ingest bench took ${((Date.now() - t0) / 1000).toFixed(0)} s`);
  const { postReadingsPerSec, copyReadingsPerSec, postToCopyRatio, yearFileSeconds, webPeakRssMb, workerPeakRssMb } = f;
  console.log(JSON.stringify({ postReadingsPerSec, copyReadingsPerSec, postToCopyRatio, yearFileSeconds, webPeakRssMb, workerPeakRssMb }));
  process.exit(0);
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  main().catch((err) => {
    console.error(err);
    process.exit(1);
  });
}
