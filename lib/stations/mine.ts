/**
 * "My stations": the stations a person owns, and those of the sites they steward, each with its
 * latest reading, its latest night summary and a thinned curve of that night for a sparkline.
 */
import { sql } from "drizzle-orm";
import type { Ctx } from "@/lib/auth/guard";
import { requireUser } from "@/lib/auth/guard";
import { nightBounds } from "@/ingest/night";

export type MyStation = {
  slug: string;
  name: string;
  siteName: string | null;
  status: "active" | "retired";
  approval: "none" | "pending" | "approved" | "declined";
  timeZone: string;
  relation: "owner" | "steward";
  lastReadingAt: string | null;
  lastReadingMag: number | null;
  lastNight: null | { night: string; readings: number; usableReadings: number; medianMag: number | null; usableHours: number };
  /** [ms, mag, usable] for the last summarised night, at most ~120 points. */
  curve: [number, number, boolean][];
};

const CURVE_POINTS = 120;

export async function listMyStations({ ctx }: { ctx: Ctx }): Promise<MyStation[]> {
  const user = requireUser(ctx);
  const res = await ctx.db.execute<{
    slug: string;
    id: string;
    name: string;
    site_name: string | null;
    status: "active" | "retired";
    approval: MyStation["approval"];
    time_zone: string;
    is_owner: boolean;
    last_at: Date | null;
    last_mag: number | null;
    night: string | null;
    readings: number | null;
    usable_readings: number | null;
    median_mag: number | null;
    usable_hours: number | null;
  }>(sql`
    SELECT st.id, st.slug, st.name, si.name AS site_name, st.status::text AS status, st.approval::text AS approval, st.time_zone,
           (st.owner_id = ${user.id}::uuid) AS is_owner, lr.taken_at AS last_at, lr.mag AS last_mag,
           to_char(ns.night, 'YYYY-MM-DD') AS night, ns.readings, ns.usable_readings, ns.median_mag, ns.usable_hours
    FROM stations st
    LEFT JOIN sites si ON si.id = st.site_id
    LEFT JOIN LATERAL (SELECT taken_at, mag FROM readings r WHERE r.station_id = st.id ORDER BY taken_at DESC LIMIT 1) lr ON TRUE
    LEFT JOIN LATERAL (SELECT * FROM night_summaries n WHERE n.station_id = st.id ORDER BY night DESC LIMIT 1) ns ON TRUE
    WHERE st.owner_id = ${user.id}::uuid
       OR EXISTS (SELECT 1 FROM site_stewards ss WHERE ss.site_id = st.site_id AND ss.user_id = ${user.id}::uuid)
    ORDER BY (st.owner_id = ${user.id}::uuid) DESC, st.status, si.name NULLS LAST, st.name`);
  const out: MyStation[] = [];
  for (const r of res.rows) {
    let curve: MyStation["curve"] = [];
    if (r.night) {
      const b = nightBounds(r.night, r.time_zone);
      // Thinned in SQL: every k-th reading of the night, so a one-minute night costs ~120 rows.
      const pts = await ctx.db.execute<{ t: Date; mag: number; flags: number }>(sql`
        WITH n AS (
          SELECT taken_at, mag, flags, row_number() OVER (ORDER BY taken_at) AS i, count(*) OVER () AS c
          FROM readings WHERE station_id = ${r.id}::uuid AND taken_at >= ${b.start.toISOString()}::timestamptz AND taken_at < ${b.end.toISOString()}::timestamptz
        )
        SELECT taken_at AS t, mag, flags FROM n WHERE (i - 1) % GREATEST(1, ceil(c::numeric / ${CURVE_POINTS}))::int = 0 ORDER BY taken_at`);
      curve = pts.rows.map((p) => [new Date(p.t).getTime(), p.mag, p.flags === 0]);
    }
    out.push({
      slug: r.slug,
      name: r.name,
      siteName: r.site_name,
      status: r.status,
      approval: r.approval,
      timeZone: r.time_zone,
      relation: r.is_owner ? "owner" : "steward",
      lastReadingAt: r.last_at ? new Date(r.last_at).toISOString() : null,
      lastReadingMag: r.last_mag,
      lastNight: r.night
        ? { night: r.night, readings: r.readings ?? 0, usableReadings: r.usable_readings ?? 0, medianMag: r.median_mag, usableHours: r.usable_hours ?? 0 }
        : null,
      curve,
    });
  }
  return out;
}
