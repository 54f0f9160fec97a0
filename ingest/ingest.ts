import type { PoolClient } from "pg";
import { pool } from "@/db";
import { nightResolver } from "./night";
import { createSkyCache, screenBatch, type SkyCache } from "./screening/sky-positions";
import type { ScreenThresholds } from "./screening/screen";
import type { ValidReading } from "./validate";

export type IngestStation = {
  id: string;
  lat: number;
  lon: number;
  timeZone: string;
  thresholds: Partial<ScreenThresholds>;
};

export type ReadingSource = "post" | "upload" | "survey" | "seed";

const g = globalThis as unknown as { __nmSky?: SkyCache };
/** One cache of Sun and Moon positions per process, shared by every station. */
export function skyCache(): SkyCache {
  // 100,000 one-minute knots (about 70 days of minutes, ~30 MB) keep web and worker processes small;
  // a batch or a file walks forward in time, so older minutes are rarely needed again.
  g.__nmSky ??= createSkyCache({ maxKnots: Number(process.env.SKY_CACHE_MAX_KNOTS ?? 100_000) });
  return g.__nmSky;
}

/**
 * One statement: insert the batch, then mark the nights of the rows that were new (joined back on
 * taken_at; the night of each item is computed in JS and passed alongside). A single statement is
 * atomic on its own, so a POST needs one round trip instead of five (BEGIN, INSERT … RETURNING every
 * new row, mark, COMMIT), and no new row's timestamp is sent back and parsed.
 */
const STORE_SQL = `
WITH u AS (
  SELECT * FROM unnest($2::timestamptz[], $3::real[], $4::real[], $5::real[], $6::real[], $7::real[], $8::smallint[], $11::date[])
    AS u(t, m, tc, sa, ma, mf, f, n)
), ins AS (
  INSERT INTO readings (station_id, taken_at, mag, temp_c, sun_alt_deg, moon_alt_deg, moon_fraction, flags, source, upload_id)
  SELECT $1::uuid, u.t, u.m, u.tc, u.sa, u.ma, u.mf, u.f, $9::reading_source, $10::uuid FROM u
  ON CONFLICT DO NOTHING
  RETURNING taken_at
), mark AS (
  INSERT INTO dirty_nights (station_id, night)
  SELECT DISTINCT $1::uuid, u.n FROM u JOIN ins ON ins.taken_at = u.t
  ON CONFLICT (station_id, night) DO UPDATE SET marked_at = now()
  RETURNING to_char(night, 'YYYY-MM-DD') AS night
)
SELECT (SELECT count(*)::int FROM ins) AS accepted, ARRAY(SELECT night FROM mark) AS nights`;

/**
 * Screens and stores validated readings for one station, idempotently on (station, takenAt), and
 * marks the nights that gained readings for the summariser, in one atomic statement: in the caller's
 * transaction when a client is given (an upload commits a chunk and its progress together).
 * Returns how many were new and how many were already stored.
 */
export async function storeReadings(
  station: IngestStation,
  items: readonly ValidReading[],
  opts: { source: ReadingSource; uploadId?: string | null; client?: PoolClient },
): Promise<{ accepted: number; duplicates: number; nights: string[] }> {
  if (items.length === 0) return { accepted: 0, duplicates: 0, nights: [] };
  const screened = screenBatch(skyCache(), { latDeg: station.lat, lonDeg: station.lon }, items, station.thresholds);
  const n = items.length;
  const t: Date[] = new Array(n);
  const m: number[] = new Array(n);
  const tc: (number | null)[] = new Array(n);
  const sa: number[] = new Array(n);
  const ma: number[] = new Array(n);
  const mf: number[] = new Array(n);
  const f: number[] = new Array(n);
  for (let i = 0; i < n; i++) {
    const r = items[i]!;
    const s = screened[i]!;
    t[i] = r.takenAt;
    // The columns are real (float4): a valid double such as 1e-252 would underflow and PostgreSQL
    // refuses it ("out of range for type real"), so send what float4 will store anyway.
    m[i] = Math.fround(r.mag);
    tc[i] = r.tempC === null ? null : Math.fround(r.tempC);
    sa[i] = s.sunAltDeg;
    ma[i] = s.moonAltDeg;
    mf[i] = s.moonFraction;
    f[i] = s.flags;
  }
  const night: string[] = new Array(n);
  const resolve = nightResolver(station.timeZone);
  for (let i = 0; i < n; i++) night[i] = resolve(t[i]!);
  const params = [station.id, t, m, tc, sa, ma, mf, f, opts.source, opts.uploadId ?? null, night];
  // In the caller's transaction when given one (an upload commits a chunk with its progress).
  const res = opts.client
    ? await opts.client.query<{ accepted: number; nights: string[] }>(STORE_SQL, params)
    : await pool().query<{ accepted: number; nights: string[] }>(STORE_SQL, params);
  const row = res.rows[0]!;
  return { accepted: row.accepted, duplicates: n - row.accepted, nights: row.nights };
}
