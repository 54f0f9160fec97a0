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
  g.__nmSky ??= createSkyCache({ maxKnots: 400_000 });
  return g.__nmSky;
}

const INSERT_SQL = `
WITH ins AS (
  INSERT INTO readings (station_id, taken_at, mag, temp_c, sun_alt_deg, moon_alt_deg, moon_fraction, flags, source, upload_id)
  SELECT $1::uuid, u.t, u.m, u.tc, u.sa, u.ma, u.mf, u.f, $9::reading_source, $10::uuid
  FROM unnest($2::timestamptz[], $3::real[], $4::real[], $5::real[], $6::real[], $7::real[], $8::smallint[])
       AS u(t, m, tc, sa, ma, mf, f)
  ON CONFLICT DO NOTHING
  RETURNING taken_at
)
SELECT taken_at FROM ins`;

const MARK_SQL = `
INSERT INTO dirty_nights (station_id, night)
SELECT $1::uuid, n FROM unnest($2::date[]) AS n
ON CONFLICT (station_id, night) DO UPDATE SET marked_at = now()`;

/**
 * Screens and stores validated readings for one station, idempotently on (station, takenAt), and
 * marks the nights that gained readings for the summariser. Runs in the caller's transaction when
 * a client is given (an upload commits a chunk and its progress together), else in its own.
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
    m[i] = r.mag;
    tc[i] = r.tempC;
    sa[i] = s.sunAltDeg;
    ma[i] = s.moonAltDeg;
    mf[i] = s.moonFraction;
    f[i] = s.flags;
  }
  const own = !opts.client;
  const client = opts.client ?? (await pool().connect());
  try {
    if (own) await client.query("BEGIN");
    const res = await client.query<{ taken_at: Date }>(INSERT_SQL, [
      station.id, t, m, tc, sa, ma, mf, f, opts.source, opts.uploadId ?? null,
    ]);
    const resolve = nightResolver(station.timeZone);
    const nights = new Set<string>();
    for (const row of res.rows) nights.add(resolve(row.taken_at));
    if (nights.size > 0) await client.query(MARK_SQL, [station.id, [...nights]]);
    if (own) await client.query("COMMIT");
    return { accepted: res.rows.length, duplicates: n - res.rows.length, nights: [...nights] };
  } catch (err) {
    if (own) await client.query("ROLLBACK").catch(() => {});
    throw err;
  } finally {
    if (own) client.release();
  }
}
