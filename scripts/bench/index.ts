/**
 * The whole bench (issue #8):  APP_URL=… DATABASE_URL=… npx tsx scripts/bench/index.ts   (npm run bench)
 *
 * 1. The ingest figures (scripts/bench/ingest.ts) against the running app and its database.
 * 2. Reads at 1M, 3M and 10M readings: a dedicated database `<db>_bench` on the same server (made
 *    fresh and migrated), 100 bench stations on 10 sites, readings COPYed straight into readings
 *    (the model's nights at 5-minute cadence for one template station, screened once, given to every
 *    station with its own brightness offset; each size adds older nights, so history grows with
 *    size), night_summaries generated with SQL (GROUP BY station and local night: median, spread,
 *    usable hours; not ingest/summaries.ts, which would take minutes for ~100k nights).
 *    A second `next start` (same build, NEXT_DIST_DIR) on BENCH_APP_PORT points at the bench
 *    database; a bench admin signs in through the next-auth credentials flow; autocannon with 20
 *    connections measures p50/p95 of the map data route, a site's summary and nights routes, and a
 *    station's nights route at each size.
 * BENCH_APP_DIR: the checkout whose build to start (default this one); BENCH_APP_PORT (3359).
 * Targets: read p95 < 150 ms at 10M; growth (p95 at 10M / p95 at 1M) < 1.5 counts as flat.
 * Last line: JSON with the ingest keys plus readP95Ms and readGrowth.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync } from "node:fs";
import { join } from "node:path";
import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import autocannon from "autocannon";
import pg from "pg";
import { from as copyFrom } from "pg-copy-streams";
import { addDays } from "../../ingest/night";
import { createSkyCache, screenBatch } from "../../ingest/screening/sky-positions";
import { simulateStationRange } from "../../db/seed/model";
import { hashPassword } from "../../lib/auth/password";
import { ingestTable, ingestVerdicts, runIngestBench, type IngestFigures } from "./ingest";

const ROOT = join(import.meta.dirname, "..", "..");
const APP_URL = process.env.APP_URL ?? "http://127.0.0.1:3000";
const DATABASE_URL = process.env.DATABASE_URL ?? "postgres://postgres@127.0.0.1:54329/nightmark";
const BENCH_PORT = Number(process.env.BENCH_APP_PORT ?? 3359);
/** Where the production build to start lives (default: this checkout). */
const APP_DIR = process.env.BENCH_APP_DIR ?? ROOT;
const SIZES = (process.env.BENCH_SIZES ?? "1000000,3000000,10000000").split(",").map(Number);
const STATIONS = 100;
const SITES = 10;
const CONNECTIONS = 20;
const DURATION_S = Number(process.env.BENCH_READ_SECONDS ?? 6);
const CADENCE_MIN = 5;
const TZ = "America/Denver";
const READ_TARGET_MS = 150;
const FLAT_RATIO = 1.5;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const log = (s: string) => console.log(`[bench] ${s}`);

function pct(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN;
  const i = (sorted.length - 1) * p;
  const lo = Math.floor(i);
  const hi = Math.ceil(i);
  return sorted[lo]! + (sorted[hi]! - sorted[lo]!) * (i - lo);
}

function run(cmd: string, args: string[], env: NodeJS.ProcessEnv): Promise<void> {
  return new Promise((resolve, reject) => {
    const c = spawn(cmd, args, { cwd: ROOT, env, stdio: ["ignore", "inherit", "inherit"] });
    c.on("exit", (code) => (code === 0 ? resolve() : reject(new Error(`${cmd} ${args.join(" ")} exited ${code}`))));
  });
}

// ---- the bench database -----------------------------------------------------------------------

type BenchWorld = { adminEmail: string; adminPassword: string; siteSlugs: string[]; stationIds: string[]; stationSlugs: string[]; stationOffsets: number[] };

async function createBenchDb(benchUrl: string): Promise<void> {
  const u = new URL(benchUrl);
  const name = u.pathname.slice(1);
  if (!/^[a-z_][a-z0-9_]*$/.test(name)) throw new Error(`bad bench database name ${name}`);
  u.pathname = "/postgres";
  const admin = new pg.Client({ connectionString: u.toString() });
  await admin.connect();
  await admin.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
  await admin.query(`CREATE DATABASE ${name}`);
  await admin.end();
  await run(process.execPath, [join(ROOT, "node_modules", "tsx", "dist", "cli.mjs"), "db/migrate.ts"], { ...process.env, DATABASE_URL: benchUrl });
}

async function dropBenchDb(benchUrl: string) {
  const u = new URL(benchUrl);
  const name = u.pathname.slice(1);
  u.pathname = "/postgres";
  const admin = new pg.Client({ connectionString: u.toString() });
  await admin.connect();
  await admin.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
  await admin.end();
}

async function createWorld(db: pg.Pool): Promise<BenchWorld> {
  const adminEmail = "bench-admin@bench.invalid";
  const adminPassword = randomBytes(12).toString("base64url");
  const u = await db.query<{ id: string }>(
    `INSERT INTO users (email, name, role, password_hash, email_verified) VALUES ($1, 'Bench admin', 'admin', $2, now()) RETURNING id`,
    [adminEmail, await hashPassword(adminPassword)],
  );
  const ownerId = u.rows[0]!.id;
  const siteSlugs: string[] = [];
  const stationIds: string[] = [];
  const stationSlugs: string[] = [];
  const stationOffsets: number[] = [];
  for (let s = 0; s < SITES; s++) {
    const lat0 = 35 + (s % 5) * 0.8;
    const lon0 = -113 + Math.floor(s / 5) * 1.5;
    const ring: [number, number][] = [[lon0 - 0.3, lat0 - 0.2], [lon0 + 0.3, lat0 - 0.2], [lon0 + 0.3, lat0 + 0.2], [lon0 - 0.3, lat0 + 0.2], [lon0 - 0.3, lat0 - 0.2]];
    const slug = `bench-site-${s}`;
    const site = await db.query<{ id: string }>(
      `INSERT INTO sites (slug, name, boundary, time_zone, is_public) VALUES ($1, $2, $3, $4, $5) RETURNING id`,
      [slug, `Bench site ${s}`, JSON.stringify({ type: "Polygon", coordinates: [ring] }), TZ, s % 2 === 0],
    );
    siteSlugs.push(slug);
    for (let k = 0; k < STATIONS / SITES; k++) {
      const stSlug = `bench-st-${s}-${k}`;
      const r = await db.query<{ id: string }>(
        `INSERT INTO stations (slug, name, site_id, owner_id, lat, lon, time_zone, approval) VALUES ($1, $2, $3, $4, $5, $6, $7, 'approved') RETURNING id`,
        [stSlug, `Bench station ${s}-${k}`, site.rows[0]!.id, ownerId, lat0 - 0.15 + (k % 5) * 0.07, lon0 - 0.2 + Math.floor(k / 5) * 0.3, TZ],
      );
      stationIds.push(r.rows[0]!.id);
      stationSlugs.push(stSlug);
      stationOffsets.push(((s * 37 + k * 13) % 100) / 50 - 1); // −1 … +1 mag
    }
  }
  return { adminEmail, adminPassword, siteSlugs, stationIds, stationSlugs, stationOffsets };
}

type TemplateNight = { night: string; rows: { ms: number; mag: number; tempC: number; sa: number; ma: number; mf: number; f: number }[] };

/** One station's history at 5-minute cadence, newest nights last, with its screening values. */
function template(perStation: number): TemplateNight[] {
  const toNight = addDays(new Date().toISOString().slice(0, 10), -3);
  const fromNight = addDays(toNight, -Math.ceil(perStation / 95) - 30);
  const cache = createSkyCache({ stepMin: 10, maxKnots: 500_000 });
  const nights: TemplateNight[] = [];
  const station = { lat: 36.2, lon: -112.2, timeZone: TZ };
  for (const { night, readings } of simulateStationRange({ station, seed: 42, baseMag: 21.0, startDate: fromNight, fromNight, toNight, cadenceMin: CADENCE_MIN, cache })) {
    if (readings.length === 0) continue;
    const s = screenBatch(cache, { latDeg: station.lat, lonDeg: station.lon }, readings, {});
    nights.push({ night, rows: readings.map((r, i) => ({ ms: r.takenAt.getTime(), mag: r.mag, tempC: r.tempC, sa: s[i]!.sunAltDeg, ma: s[i]!.moonAltDeg, mf: s[i]!.moonFraction, f: s[i]!.flags })) });
  }
  // keep only the newest nights that make perStation rows
  let total = 0;
  let i = nights.length;
  while (i > 0 && total < perStation) total += nights[--i]!.rows.length;
  return nights.slice(i);
}

/** COPYs nights[from, to) of the template into readings for every station. */
async function loadNights(db: pg.Pool, world: BenchWorld, nights: TemplateNight[]): Promise<number> {
  const client = await db.connect();
  let rows = 0;
  try {
    const stream = client.query(copyFrom(`COPY readings (station_id, taken_at, mag, temp_c, sun_alt_deg, moon_alt_deg, moon_fraction, flags, source) FROM STDIN`));
    await pipeline(
      Readable.from((function* () {
        for (let s = 0; s < world.stationIds.length; s++) {
          const id = world.stationIds[s]!;
          const off = world.stationOffsets[s]!;
          for (const n of nights) {
            let chunk = "";
            for (const r of n.rows) {
              const mag = Math.min(23.9, Math.max(0.5, r.mag + off));
              chunk += `${id}\t${new Date(r.ms).toISOString()}\t${mag.toFixed(2)}\t${r.tempC}\t${r.sa}\t${r.ma}\t${r.mf}\t${r.f}\tseed\n`;
            }
            rows += n.rows.length;
            yield chunk;
          }
        }
      })()),
      stream,
    );
  } finally {
    client.release();
  }
  return rows;
}

/** night_summaries for the loaded nights, in SQL (median and spread of usable readings). */
async function summariseSql(db: pg.Pool, fromMs: number, toMs: number) {
  await db.query(
    `INSERT INTO night_summaries (station_id, night, readings, usable_readings, median_mag, darkest_sustained_mag, spread_mag,
        usable_hours, calibration_offset_mag, flag_counts, first_at, last_at)
     SELECT station_id, night, count(*)::int, (count(*) FILTER (WHERE flags = 0))::int,
        percentile_cont(0.5) WITHIN GROUP (ORDER BY mag) FILTER (WHERE flags = 0),
        max(mag) FILTER (WHERE flags = 0),
        stddev_pop(mag) FILTER (WHERE flags = 0),
        (count(*) FILTER (WHERE flags = 0)) * ${CADENCE_MIN} / 60.0, 0,
        jsonb_build_object('usable', count(*) FILTER (WHERE flags = 0), 'daylight', 0, 'twilight', 0, 'moonlit', 0, 'cloudSuspect', 0, 'outOfRange', 0),
        min(taken_at), max(taken_at)
     FROM (SELECT r.station_id, r.mag, r.flags, r.taken_at, ((r.taken_at AT TIME ZONE '${TZ}') - interval '12 hours')::date AS night
           FROM readings r WHERE r.taken_at >= $1 AND r.taken_at <= $2) x
     GROUP BY station_id, night
     ON CONFLICT (station_id, night) DO NOTHING`,
    [new Date(fromMs), new Date(toMs)],
  );
  await db.query(`ANALYZE readings`);
  await db.query(`ANALYZE night_summaries`);
}

// ---- the second app and the reads --------------------------------------------------------------

async function startBenchApp(benchUrl: string): Promise<ChildProcess> {
  const url = `http://127.0.0.1:${BENCH_PORT}`;
  const nextBin = join(APP_DIR, "node_modules", "next", "dist", "bin", "next");
  const child = spawn(process.execPath, [nextBin, "start", "-H", "127.0.0.1", "-p", String(BENCH_PORT)], {
    cwd: APP_DIR,
    env: { ...process.env, NODE_ENV: "production", DATABASE_URL: benchUrl, APP_URL: url, NEXTAUTH_URL: url, NEXT_TELEMETRY_DISABLED: "1" },
    stdio: ["ignore", "ignore", "inherit"],
    detached: true,
  });
  const deadline = Date.now() + 60_000;
  for (;;) {
    const ok = await fetch(`${url}/api/health`).then((r) => r.status === 200).catch(() => false);
    if (ok) return child;
    if (Date.now() > deadline || child.exitCode !== null) throw new Error(`the bench app on ${url} did not start`);
    await sleep(500);
  }
}

async function signIn(base: string, email: string, password: string): Promise<string> {
  const jar = new Map<string, string>();
  const keep = (res: Response) => {
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(";");
      const i = pair!.indexOf("=");
      jar.set(pair!.slice(0, i), pair!.slice(i + 1));
    }
  };
  const cookie = () => [...jar].map(([k, v]) => `${k}=${v}`).join("; ");
  const csrf = await fetch(`${base}/api/auth/csrf`);
  keep(csrf);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const res = await fetch(`${base}/api/auth/callback/password`, {
    method: "POST",
    redirect: "manual",
    headers: { "content-type": "application/x-www-form-urlencoded", cookie: cookie() },
    body: new URLSearchParams({ csrfToken, email, password, json: "true" }).toString(),
  });
  keep(res);
  if (![...jar.keys()].some((k) => k.includes("session-token"))) throw new Error(`bench sign-in refused (HTTP ${res.status})`);
  return cookie();
}

type ReadResult = { route: string; p50: number; p95: number; requests: number; non2xx: number };

async function measure(base: string, path: string, cookie: string): Promise<ReadResult> {
  const opts = { url: `${base}${path}`, connections: CONNECTIONS, headers: { cookie } };
  await autocannon({ ...opts, duration: 2 }); // warm-up
  const times: number[] = [];
  const inst = autocannon({ ...opts, duration: DURATION_S });
  inst.on("response", (_c: unknown, _status: number, _bytes: number, ms: number) => times.push(ms));
  const res = await inst;
  times.sort((a, b) => a - b);
  return { route: path, p50: pct(times, 0.5), p95: pct(times, 0.95), requests: times.length, non2xx: res.non2xx };
}

// ---- main --------------------------------------------------------------------------------------

async function main() {
  const t0 = Date.now();
  log(`ingest figures against ${APP_URL}`);
  const ingest: IngestFigures = await runIngestBench({ appUrl: APP_URL, databaseUrl: DATABASE_URL, log: (s) => log(s) });

  const benchUrl = (() => {
    const u = new URL(DATABASE_URL);
    u.pathname = `${u.pathname.slice(1)}_bench`.replace(/^/, "/");
    return u.toString();
  })();
  log(`bench database ${benchUrl}`);
  await createBenchDb(benchUrl);
  const db = new pg.Pool({ connectionString: benchUrl, max: 4 });
  let app: ChildProcess | undefined;
  const reads: { size: number; results: ReadResult[]; loadSec: number; summariseSec: number }[] = [];
  try {
    const world = await createWorld(db);
    let t = Date.now();
    const maxSize = Math.max(...SIZES);
    const tpl = template(Math.ceil(maxSize / STATIONS));
    log(`template: ${tpl.length} nights, ${tpl.reduce((s, n) => s + n.rows.length, 0)} readings per station (${((Date.now() - t) / 1000).toFixed(1)} s)`);
    if (!existsSync(join(APP_DIR, process.env.NEXT_DIST_DIR ?? ".next", "BUILD_ID"))) throw new Error("no production build: run next build (NEXT_DIST_DIR) first");
    app = await startBenchApp(benchUrl);
    const base = `http://127.0.0.1:${BENCH_PORT}`;
    const cookie = await signIn(base, world.adminEmail, world.adminPassword);

    // Nights are taken from the newest backwards: each size adds older history.
    let loadedNights = 0;
    let loaded = 0;
    for (const size of [...SIZES].sort((a, b) => a - b)) {
      let perStation = 0;
      let n = 0;
      while (n < tpl.length && (perStation + tpl[tpl.length - 1 - n]!.rows.length) * STATIONS <= size) perStation += tpl[tpl.length - 1 - n++]!.rows.length;
      const newNights = tpl.slice(tpl.length - n, tpl.length - loadedNights);
      t = Date.now();
      loaded += await loadNights(db, world, newNights);
      const loadSec = (Date.now() - t) / 1000;
      t = Date.now();
      await summariseSql(db, newNights[0]!.rows[0]!.ms, newNights.at(-1)!.rows.at(-1)!.ms);
      const summariseSec = (Date.now() - t) / 1000;
      loadedNights = n;
      const ns = await db.query<{ n: number }>(`SELECT count(*)::int AS n FROM night_summaries`);
      log(`size ${size.toLocaleString("en")}: ${loaded.toLocaleString("en")} readings (COPY ${loadSec.toFixed(1)} s), ${ns.rows[0]!.n} night summaries (SQL ${summariseSec.toFixed(1)} s), ${n} nights per station`);
      const routes = [
        "/api/v1/map",
        `/api/v1/sites/${world.siteSlugs[0]}/summary`,
        `/api/v1/sites/${world.siteSlugs[0]}/nights`,
        ...(existsSync(join(ROOT, "app/api/v1/stations/[slug]/nights/route.ts")) ? [`/api/v1/stations/${world.stationSlugs[0]}/nights`] : []),
      ];
      const results: ReadResult[] = [];
      for (const r of routes) {
        const m = await measure(base, r, cookie);
        results.push(m);
        log(`  ${r}: p50 ${m.p50.toFixed(1)} ms, p95 ${m.p95.toFixed(1)} ms (${m.requests} requests${m.non2xx ? `, ${m.non2xx} non-2xx` : ""})`);
      }
      reads.push({ size: loaded, results, loadSec, summariseSec });
    }
  } finally {
    if (app?.pid) {
      try {
        process.kill(-app.pid, "SIGTERM");
      } catch {
        // already gone
      }
      await sleep(1500);
    }
    await db.end();
    if (process.env.BENCH_KEEP_DB !== "1") await dropBenchDb(benchUrl).catch((e: Error) => log(`dropping the bench database: ${e.message}`));
  }

  // ---- report ----
  console.log("");
  console.log(ingestTable(ingest));
  for (const v of ingestVerdicts(ingest)) console.log(v.line);
  for (const n of ingest.notes) console.log(`note: ${n}`);
  console.log("");
  const routes = reads[0]!.results.map((r) => r.route);
  const header = ["route (20 connections)", ...reads.map((r) => `${(r.size / 1e6).toFixed(1)}M p50/p95 ms`)];
  const rows = routes.map((route, i) => [route, ...reads.map((r) => `${r.results[i]!.p50.toFixed(0)} / ${r.results[i]!.p95.toFixed(0)}${r.results[i]!.non2xx ? " !" : ""}`)]);
  const w = header.map((_, c) => Math.max(header[c]!.length, ...rows.map((r) => r[c]!.length)));
  for (const r of [header, ...rows]) console.log(r.map((c, i) => c.padEnd(w[i]!)).join("  "));
  const last = reads.at(-1)!;
  const first = reads[0]!;
  const worstIdx = last.results.reduce((b, r, i) => (r.p95 > last.results[b]!.p95 ? i : b), 0);
  const readP95Ms = Math.round(last.results[worstIdx]!.p95 * 10) / 10;
  const readGrowth = Math.round((last.results[worstIdx]!.p95 / first.results[worstIdx]!.p95) * 100) / 100;
  console.log(`worst read route at ${(last.size / 1e6).toFixed(1)}M: ${last.results[worstIdx]!.route} p95 ${readP95Ms} ms (target < ${READ_TARGET_MS} ms): ${readP95Ms < READ_TARGET_MS ? "met" : "MISSED"}`);
  console.log(`growth of that p95 from ${(first.size / 1e6).toFixed(1)}M to ${(last.size / 1e6).toFixed(1)}M: ×${readGrowth} (flat means < ${FLAT_RATIO}): ${readGrowth < FLAT_RATIO ? "met" : "MISSED"}`);
  console.log(`load: ${reads.map((r) => `COPY ${r.loadSec.toFixed(0)} s + summaries ${r.summariseSec.toFixed(0)} s`).join("; ")}`);
  console.log(`bench took ${((Date.now() - t0) / 60000).toFixed(1)} min`);
  const { postReadingsPerSec, copyReadingsPerSec, postToCopyRatio, yearFileSeconds, webPeakRssMb, workerPeakRssMb } = ingest;
  console.log(JSON.stringify({ postReadingsPerSec, copyReadingsPerSec, postToCopyRatio, yearFileSeconds, webPeakRssMb, workerPeakRssMb, readP95Ms, readGrowth }));
  process.exit(0);
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
