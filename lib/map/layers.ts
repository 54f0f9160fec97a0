/**
 * The map's data: three GeoJSON FeatureCollections (sites, stations, survey points), one SQL query per
 * layer, darkness aggregated in PostgreSQL from night_summaries (definitions in lib/sites/darkness.ts).
 * Visibility follows lib/sites/access.ts; this route is for signed-in people only.
 */
import { sql } from "drizzle-orm";
import type { Feature, FeatureCollection, MultiPolygon, Point, Polygon } from "geojson";
import { z } from "zod";
import type { Ctx } from "@/lib/auth/guard";
import { requireUser } from "@/lib/auth/guard";
import { siteVisibleSql, stationVisibleSql } from "@/lib/sites/access";
import { DARKNESS_NOW_NIGHTS, siteNightValuesSql, usableNightSql } from "@/lib/sites/darkness";
import { parsePeriod, periodSchema, type Period } from "./period";
import { rampClass } from "./ramp";
import { cachedAt, dataVersion } from "@/lib/cache/data-version";

export const mapQuerySchema = z.object({
  site: z
    .string()
    .regex(/^[a-z0-9-]{1,80}$/, "site must be a site's slug")
    .optional()
    .or(z.literal("").transform(() => undefined)),
  period: periodSchema,
  status: z.enum(["active", "retired", "all"]).default("active"),
});
export type MapQuery = z.input<typeof mapQuerySchema>;

export type SiteProps = {
  kind: "site";
  slug: string;
  name: string;
  isPublic: boolean;
  targetMag: number;
  medianMag: number | null;
  q1Mag: number | null;
  q3Mag: number | null;
  nights: number;
  lastNight: string | null;
  lastNightMag: number | null;
  rampClass: number | null;
};

export type StationProps = {
  kind: "station";
  slug: string;
  name: string;
  status: "active" | "retired";
  approval: string;
  siteSlug: string | null;
  siteName: string | null;
  own: boolean;
  medianMag: number | null;
  nights: number;
  lastNight: string | null;
  lastNightMag: number | null;
  rampClass: number | null;
};

export type SurveyPointProps = {
  kind: "survey";
  id: string;
  surveyTitle: string;
  takenAt: string;
  medianMag: number;
  spreadMag: number;
  readings: number;
  rampClass: number;
};

export type MapLayers = {
  period: { value: string; label: string; from: string | null; to: string | null };
  sites: FeatureCollection<Polygon | MultiPolygon, SiteProps>;
  stations: FeatureCollection<Point, StationProps>;
  surveyPoints: FeatureCollection<Point, SurveyPointProps>;
  timings: { sitesMs: number; stationsMs: number; surveyPointsMs: number };
};

type Num = number | string | null;
const num = (v: Num) => (v === null || v === undefined ? null : Number(v));
const day = (v: unknown) => (v === null || v === undefined ? null : v instanceof Date ? v.toISOString().slice(0, 10) : String(v).slice(0, 10));

/**
 * "Now" looks back at most this far: a station or site silent for longer has no current value
 * (and the queries stay bounded as history grows).
 */
export const RECENT_DAYS = 400;

function recentFrom(): string {
  return new Date(Date.now() - RECENT_DAYS * 86_400_000).toISOString().slice(0, 10);
}

function periodWhere(p: Period) {
  return {
    from: p.from,
    to: p.to,
    // For last30 the window is each feature's own last 30 usable nights; otherwise every night of the period.
    limit: p.kind === "last30" ? DARKNESS_NOW_NIGHTS : 100_000,
  };
}

export async function getMapLayers({ ctx, input }: { ctx: Ctx; input: MapQuery }): Promise<MapLayers> {
  const user = requireUser(ctx);
  const q = mapQuerySchema.parse(input);
  // What a person may see depends on who they are, so the cache key names them (lib/cache/data-version.ts).
  const key = `map:${user.id}:${user.role}:${JSON.stringify(q)}`;
  return cachedAt(key, await dataVersion(ctx.db), () => computeMapLayers(ctx, user, q));
}

async function computeMapLayers(ctx: Ctx, user: NonNullable<Ctx["user"]>, q: z.output<typeof mapQuerySchema>): Promise<MapLayers> {
  const period = parsePeriod(q.period);
  const { from, to, limit } = periodWhere(period);
  const siteFilter = q.site ? sql`AND si.slug = ${q.site}` : sql``;

  let t = performance.now();
  const siteRows = await ctx.db.execute<{
    slug: string; name: string; is_public: boolean; target_mag: number; boundary: Polygon | MultiPolygon;
    median_mag: Num; q1: Num; q3: Num; nights: number; last_night: unknown; last_mag: Num;
  }>(sql`
    WITH vs AS (
      SELECT si.id, si.slug, si.name, si.is_public, si.target_mag, si.boundary
        FROM sites si WHERE ${siteVisibleSql(user)} ${siteFilter}
    ), nv AS (${siteNightValuesSql(sql`SELECT id FROM vs`, from ?? recentFrom(), to)}),
    ranked AS (
      SELECT nv.*, row_number() OVER (PARTITION BY nv.site_id ORDER BY nv.night DESC) AS rn FROM nv
    )
    SELECT vs.slug, vs.name, vs.is_public, vs.target_mag, vs.boundary,
           percentile_cont(0.5) WITHIN GROUP (ORDER BY r.value_mag) AS median_mag,
           percentile_cont(0.25) WITHIN GROUP (ORDER BY r.value_mag) AS q1,
           percentile_cont(0.75) WITHIN GROUP (ORDER BY r.value_mag) AS q3,
           count(r.night)::int AS nights,
           max(r.night) AS last_night,
           (array_agg(r.value_mag ORDER BY r.night DESC) FILTER (WHERE r.night IS NOT NULL))[1] AS last_mag
      FROM vs LEFT JOIN ranked r ON r.site_id = vs.id AND r.rn <= ${limit}
     GROUP BY vs.slug, vs.name, vs.is_public, vs.target_mag, vs.boundary
     ORDER BY vs.name`);
  const sitesMs = performance.now() - t;

  t = performance.now();
  const statusFilter = q.status === "all" ? sql`` : sql`AND st.status = ${q.status}`;
  const stationRows = await ctx.db.execute<{
    slug: string; name: string; status: "active" | "retired"; approval: string; lat: number; lon: number;
    site_slug: string | null; site_name: string | null; own: boolean;
    median_mag: Num; nights: number; last_night: unknown; last_mag: Num;
  }>(sql`
    WITH vst AS (
      SELECT st.id, st.slug, st.name, st.status, st.approval, st.lat, st.lon, st.owner_id, si.slug AS site_slug, si.name AS site_name
        FROM stations st LEFT JOIN sites si ON si.id = st.site_id
       WHERE ${stationVisibleSql(user)} ${statusFilter} ${siteFilter}
    )
    SELECT v.slug, v.name, v.status, v.approval, v.lat, v.lon, v.site_slug, v.site_name,
           (v.owner_id = ${user.id}::uuid) AS own,
           m.median_mag, coalesce(m.nights, 0)::int AS nights, l.night AS last_night, l.median_mag AS last_mag
      FROM vst v
      ${
        period.kind === "last30"
          ? // Each station's own last 30 usable nights (within the past RECENT_DAYS): an index scan of 30 rows each.
            sql`LEFT JOIN LATERAL (
              SELECT percentile_cont(0.5) WITHIN GROUP (ORDER BY x.median_mag) AS median_mag, count(*) AS nights
                FROM (SELECT ns.median_mag FROM night_summaries ns
                       WHERE ns.station_id = v.id AND ${usableNightSql} AND ns.night >= current_date - ${RECENT_DAYS}::int
                       ORDER BY ns.night DESC LIMIT ${limit}) x
            ) m ON TRUE`
          : // A whole period: one grouped pass over the period's nights (faster than per-station scans).
            sql`LEFT JOIN (
              SELECT ns.station_id, percentile_cont(0.5) WITHIN GROUP (ORDER BY ns.median_mag) AS median_mag, count(*) AS nights
                FROM night_summaries ns
               WHERE ns.station_id IN (SELECT id FROM vst) AND ${usableNightSql}
                 AND ns.night >= ${from}::date AND ns.night <= ${to}::date
               GROUP BY ns.station_id
            ) m ON m.station_id = v.id`
      }
      LEFT JOIN LATERAL (
        SELECT ns.night, ns.median_mag FROM night_summaries ns
         WHERE ns.station_id = v.id AND ${usableNightSql}
           ${from ? sql`AND ns.night >= ${from}::date` : sql`AND ns.night >= current_date - ${RECENT_DAYS}::int`}
           ${to ? sql`AND ns.night <= ${to}::date` : sql``}
         ORDER BY ns.night DESC LIMIT 1
      ) l ON TRUE
     ORDER BY v.name`);
  const stationsMs = performance.now() - t;

  t = performance.now();
  // Survey points have no site: admins see all, everyone else their own walks. A site filter hides them.
  const surveyRows = q.site
    ? { rows: [] }
    : await ctx.db.execute<{
        id: string; title: string; lat: number; lon: number; taken_at: Date; median_mag: number; spread_mag: number; n: number;
      }>(sql`
        SELECT sp.id, sv.title, sp.lat, sp.lon, sp.taken_at, sp.median_mag, sp.spread_mag, cardinality(sp.values) AS n
          FROM survey_points sp JOIN surveys sv ON sv.id = sp.survey_id
         WHERE ${user.role === "admin" ? sql`TRUE` : sql`sv.user_id = ${user.id}::uuid`}
           AND sp.flags = 0
           ${from ? sql`AND sp.taken_at >= ${from}::date` : sql`AND sp.taken_at >= now() - interval '365 days'`}
           ${to ? sql`AND sp.taken_at < ${to}::date + 1` : sql``}
         ORDER BY sp.taken_at DESC LIMIT 5000`);
  const surveyPointsMs = performance.now() - t;

  const siteFeatures: Feature<Polygon | MultiPolygon, SiteProps>[] = siteRows.rows.map((r) => {
    const med = num(r.median_mag);
    return {
      type: "Feature",
      geometry: r.boundary,
      properties: {
        kind: "site",
        slug: r.slug,
        name: r.name,
        isPublic: r.is_public,
        targetMag: Number(r.target_mag),
        medianMag: med,
        q1Mag: num(r.q1),
        q3Mag: num(r.q3),
        nights: Number(r.nights),
        lastNight: day(r.last_night),
        lastNightMag: num(r.last_mag),
        rampClass: med === null ? null : rampClass(med),
      },
    };
  });
  const stationFeatures: Feature<Point, StationProps>[] = stationRows.rows.map((r) => {
    const med = num(r.median_mag);
    return {
      type: "Feature",
      geometry: { type: "Point", coordinates: [Number(r.lon), Number(r.lat)] },
      properties: {
        kind: "station",
        slug: r.slug,
        name: r.name,
        status: r.status,
        approval: r.approval,
        siteSlug: r.site_slug,
        siteName: r.site_name,
        own: !!r.own,
        medianMag: med,
        nights: Number(r.nights),
        lastNight: day(r.last_night),
        lastNightMag: num(r.last_mag),
        rampClass: med === null ? null : rampClass(med),
      },
    };
  });
  const surveyFeatures: Feature<Point, SurveyPointProps>[] = surveyRows.rows.map((r) => ({
    type: "Feature",
    geometry: { type: "Point", coordinates: [Number(r.lon), Number(r.lat)] },
    properties: {
      kind: "survey",
      id: r.id,
      surveyTitle: r.title,
      takenAt: new Date(r.taken_at).toISOString(),
      medianMag: Number(r.median_mag),
      spreadMag: Number(r.spread_mag),
      readings: Number(r.n),
      rampClass: rampClass(Number(r.median_mag)),
    },
  }));

  return {
    period: { value: q.period, label: period.label, from, to },
    sites: { type: "FeatureCollection", features: siteFeatures },
    stations: { type: "FeatureCollection", features: stationFeatures },
    surveyPoints: { type: "FeatureCollection", features: surveyFeatures },
    timings: { sitesMs: Math.round(sitesMs), stationsMs: Math.round(stationsMs), surveyPointsMs: Math.round(surveyPointsMs) },
  };
}
