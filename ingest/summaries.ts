import type { PoolClient } from "pg";
import { pool } from "@/db";
import { BUMP_DATA_VERSION_SQL } from "@/lib/cache/data-version";
import { nightBounds } from "./night";
import { calibrationOffsetAt, summariseNight } from "./summarise";

type StationRow = {
  id: string;
  time_zone: string;
  site_id: string | null;
  sun_max_alt_deg: number | null;
  moon_max_alt_deg: number | null;
  cloud_window_min: number | null;
  cloud_spread_mag: number | null;
};

const CLAIM_SQL = `
WITH c AS (
  SELECT station_id, night, marked_at FROM dirty_nights
   WHERE marked_at < clock_timestamp() - make_interval(secs => $2::float8 / 1000)
   ORDER BY marked_at LIMIT $1 FOR UPDATE SKIP LOCKED
)
SELECT station_id, to_char(night, 'YYYY-MM-DD') AS night, marked_at::text AS marked_at FROM c`;

/**
 * Summarises up to `limit` nights that new readings touched: re-applies the screening thresholds,
 * sets the cloud flag (it needs the whole night), and upserts the night summary. Each night is its
 * own transaction; a night marked again while it was being summarised stays marked.
 * Returns the stations (and their sites) whose summaries changed.
 */
export async function summariseDirtyNights(
  limit = 50,
  // A night still being written (a burst of batches, an import) is summarised once it has been
  // quiet this long, not after every batch: the same result with less work while ingest is busy.
  quietMs = Number(process.env.SUMMARY_QUIET_MS ?? 2000),
): Promise<{ nights: number; siteIds: string[]; stationIds: string[] }> {
  const client = await pool().connect();
  const siteIds = new Set<string>();
  const stationIds = new Set<string>();
  let count = 0;
  try {
    await client.query("BEGIN");
    const claimed = await client.query<{ station_id: string; night: string; marked_at: string }>(CLAIM_SQL, [limit, quietMs]);
    const stationCache = new Map<string, StationRow | null>();
    const calCache = new Map<string, { effectiveFrom: string; offsetMag: number }[]>();
    for (const row of claimed.rows) {
      let st = stationCache.get(row.station_id);
      if (st === undefined) {
        const r = await client.query<StationRow>(
          `SELECT s.id, s.time_zone, s.site_id, si.sun_max_alt_deg, si.moon_max_alt_deg, si.cloud_window_min, si.cloud_spread_mag
           FROM stations s LEFT JOIN sites si ON si.id = s.site_id WHERE s.id = $1`,
          [row.station_id],
        );
        st = r.rows[0] ?? null;
        stationCache.set(row.station_id, st);
        const cals = await client.query<{ effective_from: string; offset_mag: number }>(
          `SELECT to_char(effective_from, 'YYYY-MM-DD') AS effective_from, offset_mag FROM calibrations WHERE station_id = $1`,
          [row.station_id],
        );
        calCache.set(row.station_id, cals.rows.map((c) => ({ effectiveFrom: c.effective_from, offsetMag: c.offset_mag })));
      }
      await client.query("SAVEPOINT night");
      try {
        if (st) await summariseOne(client, st, row.night, calCache.get(row.station_id) ?? []);
        await client.query(`DELETE FROM dirty_nights WHERE station_id = $1 AND night = $2 AND marked_at = $3::timestamptz`, [
          row.station_id, row.night, row.marked_at,
        ]);
        await client.query("RELEASE SAVEPOINT night");
        count++;
        stationIds.add(row.station_id);
        if (st?.site_id) siteIds.add(st.site_id);
      } catch (err) {
        await client.query("ROLLBACK TO SAVEPOINT night");
        console.error(`[summaries] night ${row.night} of station ${row.station_id} failed; left for a retry`, err);
      }
    }
    // New summaries change what the read routes show (lib/cache/data-version.ts).
    if (count > 0) await client.query(BUMP_DATA_VERSION_SQL);
    await client.query("COMMIT");
  } catch (err) {
    await client.query("ROLLBACK").catch(() => {});
    throw err;
  } finally {
    client.release();
  }
  return { nights: count, siteIds: [...siteIds], stationIds: [...stationIds] };
}

export async function summariseOne(
  client: PoolClient,
  st: StationRow,
  night: string,
  calibrations: { effectiveFrom: string; offsetMag: number }[],
) {
  const { start, end } = nightBounds(night, st.time_zone);
  const res = await client.query<{ taken_at: Date; mag: number; flags: number; sun_alt_deg: number; moon_alt_deg: number }>(
    `SELECT taken_at, mag, flags, sun_alt_deg, moon_alt_deg FROM readings
     WHERE station_id = $1 AND taken_at >= $2 AND taken_at < $3 ORDER BY taken_at`,
    [st.id, start, end],
  );
  const readings = res.rows.map((r) => ({ takenAt: r.taken_at, mag: r.mag, flags: r.flags, sunAltDeg: r.sun_alt_deg, moonAltDeg: r.moon_alt_deg }));
  if (readings.length === 0) {
    await client.query(`DELETE FROM night_summaries WHERE station_id = $1 AND night = $2`, [st.id, night]);
    return;
  }
  const offset = calibrationOffsetAt(calibrations, night);
  const s = summariseNight(readings, {
    calibrationOffsetMag: offset,
    cloudWindowMin: st.cloud_window_min ?? 15,
    cloudSpreadMag: st.cloud_spread_mag ?? 0.25,
    sunMaxAltDeg: st.sun_max_alt_deg ?? -18,
    moonMaxAltDeg: st.moon_max_alt_deg ?? 0,
  });
  // Store the re-screened flags where they changed (thresholds or the cloud test moved them).
  const changedT: Date[] = [];
  const changedF: number[] = [];
  for (let i = 0; i < readings.length; i++) {
    if (s.cloudFlags[i] !== readings[i]!.flags) {
      changedT.push(readings[i]!.takenAt);
      changedF.push(s.cloudFlags[i]!);
    }
  }
  if (changedT.length > 0) {
    await client.query(
      `UPDATE readings r SET flags = u.f FROM unnest($2::timestamptz[], $3::smallint[]) AS u(t, f)
       WHERE r.station_id = $1 AND r.taken_at = u.t`,
      [st.id, changedT, changedF],
    );
  }
  await client.query(
    `INSERT INTO night_summaries (station_id, night, readings, usable_readings, median_mag, darkest_sustained_mag, spread_mag,
       usable_hours, calibration_offset_mag, flag_counts, first_at, last_at, computed_at)
     VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12, now())
     ON CONFLICT (station_id, night) DO UPDATE SET readings = EXCLUDED.readings, usable_readings = EXCLUDED.usable_readings,
       median_mag = EXCLUDED.median_mag, darkest_sustained_mag = EXCLUDED.darkest_sustained_mag, spread_mag = EXCLUDED.spread_mag,
       usable_hours = EXCLUDED.usable_hours, calibration_offset_mag = EXCLUDED.calibration_offset_mag,
       flag_counts = EXCLUDED.flag_counts, first_at = EXCLUDED.first_at, last_at = EXCLUDED.last_at, computed_at = now()`,
    [
      st.id, night, s.readings, s.usableReadings, s.medianMag, s.darkestSustainedMag, s.spreadMag, s.usableHours,
      s.calibrationOffsetMag, JSON.stringify(s.flagCounts), s.firstAt, s.lastAt,
    ],
  );
}

/** Marks every night of a station for re-summarising (after a calibration or threshold change). */
export async function markAllNights(client: Pick<PoolClient, "query">, stationId: string) {
  await client.query(
    `INSERT INTO dirty_nights (station_id, night) SELECT station_id, night FROM night_summaries WHERE station_id = $1
     ON CONFLICT (station_id, night) DO UPDATE SET marked_at = now()`,
    [stationId],
  );
}
