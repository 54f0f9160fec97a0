import { sql } from "drizzle-orm";
import type { Db } from "@/db";

/**
 * Read routes that aggregate night summaries (site pages, the map) keep their results per process,
 * keyed by a data version that every change bumps: the worker after it summarises nights, and
 * recordAudit for every change to sites, stations, roles, calibration and the rest. A web process
 * holds no state that matters: a new process, or another process, just computes again.
 */
const KEY = "data:version";

type Queryable = { execute: Db["execute"] };

export async function dataVersion(db: Queryable): Promise<string> {
  const r = await db.execute<{ v: string | null }>(sql`SELECT value #>> '{}' AS v FROM app_meta WHERE key = ${KEY}`);
  return r.rows[0]?.v ?? "0";
}

export const BUMP_DATA_VERSION_SQL = `INSERT INTO app_meta (key, value, updated_at) VALUES ('${KEY}', to_jsonb(clock_timestamp()::text), now())
  ON CONFLICT (key) DO UPDATE SET value = EXCLUDED.value, updated_at = now()`;

export async function bumpDataVersion(db: Queryable) {
  await db.execute(sql.raw(BUMP_DATA_VERSION_SQL));
}

const MAX_ENTRIES = 500;
const g = globalThis as unknown as { __nmReadCache?: Map<string, { version: string; value: Promise<unknown> }> };

/** The value for `key` at data version `version`, computed once per process (concurrent callers share it). */
export function cachedAt<T>(key: string, version: string, compute: () => Promise<T>): Promise<T> {
  g.__nmReadCache ??= new Map();
  const cache = g.__nmReadCache;
  const hit = cache.get(key);
  if (hit && hit.version === version) {
    cache.delete(key);
    cache.set(key, hit); // most recently used last
    return hit.value as Promise<T>;
  }
  const value = compute();
  const entry = { version, value: value as Promise<unknown> };
  cache.set(key, entry);
  // A failure is not kept: the next caller tries again.
  value.catch(() => {
    if (cache.get(key) === entry) cache.delete(key);
  });
  while (cache.size > MAX_ENTRIES) cache.delete(cache.keys().next().value!);
  return value;
}
