/**
 * Service verbs for sites: list, summary, nights, hours (heatmap), update. Each takes { ctx, input }
 * and does its own authorisation (lib/sites/access.ts). Definitions of darkness: lib/sites/darkness.ts.
 */
import { eq, sql } from "drizzle-orm";
import { z } from "zod";
import { sites } from "@/db/schema";
import type { Ctx } from "@/lib/auth/guard";
import { requireSiteSteward, requireUser } from "@/lib/auth/guard";
import { recordAudit } from "@/lib/audit";
import { badRequest, notFound } from "@/lib/errors";
import { brighteningPercentPerYear } from "@/lib/photometry";
import { enoughForTrend, mannKendall, theilSen } from "@/lib/stats/trend";
import { rampClass } from "@/lib/map/ramp";
import { findSiteForViewer, roundPosition, siteVisibleSql, stationVisibleSql } from "./access";
import { darknessNow, plainTerms, siteNightValuesSql, usableNightSql, type Darkness, type NightValue, type PlainTerms } from "./darkness";
import { isValidTimeZone, validateBoundary } from "./boundary";
import { cachedAt, dataVersion } from "@/lib/cache/data-version";

type Input<T> = { ctx: Ctx; input: T };
const day = (v: unknown) => (v instanceof Date ? v.toISOString().slice(0, 10) : String(v).slice(0, 10));

// ---------------------------------------------------------------------------------------------
// List
// ---------------------------------------------------------------------------------------------

export type SiteListItem = {
  slug: string;
  name: string;
  description: string;
  isPublic: boolean;
  targetMag: number;
  lightingZone: string | null;
  stations: number;
  medianMag: number | null;
  nights: number;
  lastNight: string | null;
  steward: boolean;
};

export async function listSitesForViewer({ ctx }: { ctx: Ctx }): Promise<SiteListItem[]> {
  const user = requireUser(ctx);
  const rows = await ctx.db.execute<{
    slug: string; name: string; description: string; is_public: boolean; target_mag: number; lighting_zone: string | null;
    stations: number; median_mag: number | null; nights: number; last_night: unknown; steward: boolean;
  }>(sql`
    WITH vs AS (SELECT si.* FROM sites si WHERE ${siteVisibleSql(user)}),
    nv AS (${siteNightValuesSql(sql`SELECT id FROM vs`, null, null)}),
    ranked AS (SELECT nv.*, row_number() OVER (PARTITION BY site_id ORDER BY night DESC) rn FROM nv)
    SELECT vs.slug, vs.name, vs.description, vs.is_public, vs.target_mag, vs.lighting_zone,
           (SELECT count(*) FROM stations st WHERE st.site_id = vs.id AND st.approval = 'approved' AND st.status = 'active')::int AS stations,
           percentile_cont(0.5) WITHIN GROUP (ORDER BY r.value_mag) AS median_mag,
           count(r.night)::int AS nights, max(r.night) AS last_night,
           (${user.role === "admin"} OR EXISTS (SELECT 1 FROM site_stewards ss WHERE ss.site_id = vs.id AND ss.user_id = ${user.id}::uuid)) AS steward
      FROM vs LEFT JOIN ranked r ON r.site_id = vs.id AND r.rn <= 30
     GROUP BY vs.id, vs.slug, vs.name, vs.description, vs.is_public, vs.target_mag, vs.lighting_zone
     ORDER BY vs.name`);
  return rows.rows.map((r) => ({
    slug: r.slug,
    name: r.name,
    description: r.description,
    isPublic: r.is_public,
    targetMag: Number(r.target_mag),
    lightingZone: r.lighting_zone,
    stations: Number(r.stations),
    medianMag: r.median_mag === null ? null : Number(r.median_mag),
    nights: Number(r.nights),
    lastNight: r.last_night ? day(r.last_night) : null,
    steward: !!r.steward,
  }));
}

// ---------------------------------------------------------------------------------------------
// Summary
// ---------------------------------------------------------------------------------------------

export type SiteStationRow = {
  slug: string;
  name: string;
  status: "active" | "retired";
  approval: string;
  lat: number;
  lon: number;
  positionRounded: boolean;
  lastReadingAt: string | null;
  nightsReported: number;
  medianMag: number | null;
  calibrationOffsetMag: number;
};

export type SiteTrend =
  | { ok: false; reason: string }
  | {
      ok: true;
      reason: string;
      slopeMagPerYear: number;
      lowerMagPerYear: number;
      upperMagPerYear: number;
      brighteningPercentPerYear: number;
      /** Trend line value at night t: intercept + slope · (days since epoch / 365.25). */
      interceptMag: number;
      mannKendallZ: number;
      p: number;
      nights: number;
    };

export type SiteSummary = {
  mode: "full" | "public";
  canEdit: boolean;
  site: {
    slug: string;
    name: string;
    description: string;
    timeZone: string;
    targetMag: number;
    naturalSkyMag: number;
    isPublic: boolean;
    roundPublicPositions: boolean;
    lightingZone: string | null;
    thresholds: { sunMaxAltDeg: number; moonMaxAltDeg: number; cloudWindowMin: number; cloudSpreadMag: number };
    boundary: unknown;
  };
  darkness: (Darkness & { plain: PlainTerms; rampClass: number; meetsTarget: boolean }) | null;
  lastNight: { night: string; mag: number; stations: number } | null;
  trend: SiteTrend;
  stations: SiteStationRow[];
  definitions: Record<string, string>;
};

async function nightValues(ctx: Ctx, siteId: string): Promise<(NightValue & { stations: number })[]> {
  // The same for every viewer (approved stations only): kept per data version (lib/cache/data-version.ts).
  return cachedAt(`site-nights:${siteId}`, await dataVersion(ctx.db), async () => {
    const rows = await ctx.db.execute<{ night: unknown; value_mag: number; stations: number }>(
      sql`SELECT night, value_mag, stations FROM (${siteNightValuesSql(sql`${siteId}::uuid`, null, null)}) nv ORDER BY night`,
    );
    return rows.rows.map((r) => ({ night: day(r.night), mag: Number(r.value_mag), stations: Number(r.stations) }));
  });
}

/** The trend of a site's nightly values, computed once per data version. */
async function cachedSiteTrend(ctx: Ctx, siteId: string, values: NightValue[]): Promise<SiteTrend> {
  return cachedAt(`site-trend:${siteId}`, await dataVersion(ctx.db), async () => siteTrend(values));
}

const YEAR_DAYS = 365.25;
const dayNumber = (night: string) => Date.parse(`${night}T00:00:00Z`) / 86_400_000;

function siteTrend(values: NightValue[]): SiteTrend {
  const enough = enoughForTrend(values);
  if (!enough.ok) return { ok: false, reason: enough.reason };
  const x = values.map((v) => dayNumber(v.night) / YEAR_DAYS);
  const y = values.map((v) => v.mag);
  const ts = theilSen(x, y, 0.05, { maxPairs: 2_000_000 });
  const mk = mannKendall(y);
  return {
    ok: true,
    reason: enough.reason,
    slopeMagPerYear: ts.slope,
    lowerMagPerYear: ts.lower,
    upperMagPerYear: ts.upper,
    brighteningPercentPerYear: brighteningPercentPerYear(ts.slope),
    interceptMag: ts.intercept,
    mannKendallZ: mk.z,
    p: mk.p,
    nights: values.length,
  };
}

export const DEFINITIONS = {
  usableNight: "A station's night counts when it has a median of usable readings from at least 3 usable readings.",
  siteNight: "A night's site value is the median of its approved stations' night medians (calibrated).",
  darknessNow: "Darkness now is the median of the site's last 30 nights that have a value; the spread is the interquartile range.",
  histogram: "The histogram counts usable nightly site values (one per night), not individual readings.",
  heatmap: "Each cell is the median over stations of that station's median of usable readings in that local hour.",
  trend: "Theil–Sen slope of nightly site values, with the Mann–Kendall test; negative mag/arcsec² per year means brightening.",
};

export async function getSiteSummary({ ctx, input }: Input<{ slug: string; publicView?: boolean }>): Promise<SiteSummary> {
  const { site, mode, canEdit } = await findSiteForViewer({ ctx, input });
  const values = await nightValues(ctx, site.id);
  const dn = darknessNow(values);
  const last = values[values.length - 1];

  const visible = mode === "public" ? sql`st.approval = 'approved'` : stationVisibleSql(ctx.user);
  const stationRows = await ctx.db.execute<{
    slug: string; name: string; status: "active" | "retired"; approval: string; lat: number; lon: number;
    last_at: Date | null; nights: number; median_mag: number | null; offset_mag: number | null;
  }>(sql`
    SELECT st.slug, st.name, st.status, st.approval, st.lat, st.lon, agg.last_at, coalesce(agg.nights, 0)::int AS nights, rec.median_mag,
           (SELECT c.offset_mag FROM calibrations c WHERE c.station_id = st.id AND c.effective_from <= current_date
             ORDER BY c.effective_from DESC LIMIT 1) AS offset_mag
      FROM stations st
      JOIN sites si ON si.id = st.site_id
      LEFT JOIN LATERAL (
        SELECT max(ns.last_at) AS last_at, count(*) FILTER (WHERE ${usableNightSql}) AS nights
          FROM night_summaries ns WHERE ns.station_id = st.id
      ) agg ON TRUE
      LEFT JOIN LATERAL (
        SELECT percentile_cont(0.5) WITHIN GROUP (ORDER BY x.median_mag) AS median_mag FROM (
          SELECT ns.median_mag FROM night_summaries ns WHERE ns.station_id = st.id AND ${usableNightSql}
           ORDER BY ns.night DESC LIMIT 30) x
      ) rec ON TRUE
     WHERE st.site_id = ${site.id}::uuid AND ${visible}
     ORDER BY st.name`);
  const round = mode === "public" && site.roundPublicPositions;
  const stations: SiteStationRow[] = stationRows.rows.map((r) => {
    const pos = round ? roundPosition(Number(r.lat), Number(r.lon)) : { lat: Number(r.lat), lon: Number(r.lon) };
    return {
      slug: r.slug,
      name: r.name,
      status: r.status,
      approval: r.approval,
      ...pos,
      positionRounded: round,
      lastReadingAt: r.last_at ? new Date(r.last_at).toISOString() : null,
      nightsReported: Number(r.nights),
      medianMag: r.median_mag === null ? null : Number(r.median_mag),
      calibrationOffsetMag: r.offset_mag === null ? 0 : Number(r.offset_mag),
    };
  });

  return {
    mode,
    canEdit,
    site: {
      slug: site.slug,
      name: site.name,
      description: site.description,
      timeZone: site.timeZone,
      targetMag: site.targetMag,
      naturalSkyMag: site.naturalSkyMag,
      isPublic: site.isPublic,
      roundPublicPositions: site.roundPublicPositions,
      lightingZone: site.lightingZone,
      thresholds: {
        sunMaxAltDeg: site.sunMaxAltDeg,
        moonMaxAltDeg: site.moonMaxAltDeg,
        cloudWindowMin: site.cloudWindowMin,
        cloudSpreadMag: site.cloudSpreadMag,
      },
      boundary: site.boundary,
    },
    darkness: dn
      ? { ...dn, plain: plainTerms(dn.medianMag, site.naturalSkyMag), rampClass: rampClass(dn.medianMag), meetsTarget: dn.medianMag >= site.targetMag }
      : null,
    lastNight: last ? { night: last.night, mag: last.mag, stations: last.stations } : null,
    trend: await cachedSiteTrend(ctx, site.id, values),
    stations,
    definitions: DEFINITIONS,
  };
}

// ---------------------------------------------------------------------------------------------
// Nights and hours
// ---------------------------------------------------------------------------------------------

export const nightsQuerySchema = z.object({
  from: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, "from must be YYYY-MM-DD").optional(),
  to: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, "to must be YYYY-MM-DD").optional(),
});

export async function getSiteNights({ ctx, input }: Input<{ slug: string; publicView?: boolean; from?: string; to?: string }>) {
  const { site } = await findSiteForViewer({ ctx, input });
  const all = await nightValues(ctx, site.id);
  const nights = all.filter((n) => (!input.from || n.night >= input.from) && (!input.to || n.night <= input.to));
  return { site: { slug: site.slug, targetMag: site.targetMag, timeZone: site.timeZone }, nights, trend: await cachedSiteTrend(ctx, site.id, all) };
}

export const monthSchema = z.string().regex(/^\d{4}-(0[1-9]|1[0-2])$/, "month must be YYYY-MM");

export type HourCell = { night: string; hour: number; mag: number; readings: number; stations: number };

/**
 * Hourly medians of usable readings (flags 0) for one month of nights (named by evening date in the
 * site's zone), from readings: per station and local hour the median raw value plus the station's
 * calibration offset in force at the month's end, then the median over stations.
 */
export async function getSiteHours({ ctx, input }: Input<{ slug: string; publicView?: boolean; month: string }>) {
  const month = monthSchema.parse(input.month);
  const { site } = await findSiteForViewer({ ctx, input });
  const [y, m] = month.split("-").map(Number) as [number, number];
  const start = `${month}-01`;
  const next = m === 12 ? `${y + 1}-01-01` : `${y}-${String(m + 1).padStart(2, "0")}-01`;
  const tz = site.timeZone;
  const rows = await ctx.db.execute<{ night: unknown; hour: number; mag: number; readings: number; stations: number }>(sql`
    WITH st AS (
      SELECT s.id, coalesce((SELECT c.offset_mag FROM calibrations c WHERE c.station_id = s.id AND c.effective_from < ${next}::date
                             ORDER BY c.effective_from DESC LIMIT 1), 0) AS off
        FROM stations s WHERE s.site_id = ${site.id}::uuid AND s.approval = 'approved'
    ), cells AS (
      SELECT r.station_id,
             ((r.taken_at AT TIME ZONE ${tz}) - interval '12 hours')::date AS night,
             extract(hour FROM r.taken_at AT TIME ZONE ${tz})::int AS hour,
             percentile_cont(0.5) WITHIN GROUP (ORDER BY r.mag) AS med, count(*) AS n
        FROM readings r JOIN st ON st.id = r.station_id
       WHERE r.taken_at >= ((${start}::date + time '12:00') AT TIME ZONE ${tz})
         AND r.taken_at < ((${next}::date + time '12:00') AT TIME ZONE ${tz})
         AND r.flags = 0
       GROUP BY 1, 2, 3
    )
    SELECT cells.night, cells.hour, percentile_cont(0.5) WITHIN GROUP (ORDER BY cells.med + st.off)::float8 AS mag,
           sum(cells.n)::int AS readings, count(*)::int AS stations
      FROM cells JOIN st ON st.id = cells.station_id
     GROUP BY cells.night, cells.hour ORDER BY cells.night, cells.hour`);
  const cells: HourCell[] = rows.rows.map((r) => ({
    night: day(r.night),
    hour: Number(r.hour),
    mag: Number(r.mag),
    readings: Number(r.readings),
    stations: Number(r.stations),
  }));
  return { site: { slug: site.slug, timeZone: tz, targetMag: site.targetMag }, month, cells };
}

/** Months (YYYY-MM) that have nightly values, newest first: the choices for the heatmap. */
export function monthsOf(nights: { night: string }[]): string[] {
  return [...new Set(nights.map((n) => n.night.slice(0, 7)))].sort().reverse();
}

// ---------------------------------------------------------------------------------------------
// Update (stewards)
// ---------------------------------------------------------------------------------------------

export const siteUpdateSchema = z.object({
  name: z.string().trim().min(2, "Give the site a name").max(120),
  description: z.string().trim().max(2000).default(""),
  timeZone: z.string().trim().refine(isValidTimeZone, "Not an IANA time zone this server knows (e.g. America/Denver)"),
  targetMag: z.coerce.number().min(14, "Target darkness must be 14–23 mag/arcsec²").max(23, "Target darkness must be 14–23 mag/arcsec²"),
  sunMaxAltDeg: z.coerce.number().min(-30, "Sun threshold must be −30° to 0°").max(0, "Sun threshold must be −30° to 0°"),
  moonMaxAltDeg: z.coerce.number().min(-30, "Moon threshold must be −30° to 30°").max(30, "Moon threshold must be −30° to 30°"),
  cloudWindowMin: z.coerce.number().min(1, "Cloud window must be 1–240 minutes").max(240, "Cloud window must be 1–240 minutes"),
  cloudSpreadMag: z.coerce.number().min(0.01, "Cloud spread must be 0.01–3 mag").max(3, "Cloud spread must be 0.01–3 mag"),
  isPublic: z.boolean(),
  roundPublicPositions: z.boolean(),
  lightingZone: z.enum(["E0", "E1", "E2", "E3", "E4"]).nullable(),
  boundary: z.unknown().optional(),
});
export type SiteUpdate = z.infer<typeof siteUpdateSchema>;

export async function updateSite({ ctx, input }: Input<{ slug: string; changes: SiteUpdate }>) {
  const [site] = await ctx.db.select().from(sites).where(eq(sites.slug, input.slug)).limit(1);
  if (!site) throw notFound("The site");
  const user = await requireSiteSteward(ctx, site.id);
  const c = siteUpdateSchema.parse(input.changes);
  let boundary = site.boundary;
  if (c.boundary !== undefined) {
    const v = validateBoundary(c.boundary);
    if (!v.ok) throw badRequest(`The boundary is not valid: ${v.errors.join(" ")}`, v.errors);
    boundary = v.boundary;
  }
  const after = {
    name: c.name,
    description: c.description,
    timeZone: c.timeZone,
    targetMag: c.targetMag,
    sunMaxAltDeg: c.sunMaxAltDeg,
    moonMaxAltDeg: c.moonMaxAltDeg,
    cloudWindowMin: c.cloudWindowMin,
    cloudSpreadMag: c.cloudSpreadMag,
    isPublic: c.isPublic,
    roundPublicPositions: c.roundPublicPositions,
    lightingZone: c.lightingZone,
    boundary,
  };
  const before = Object.fromEntries(Object.keys(after).map((k) => [k, site[k as keyof typeof site]]));
  await ctx.db.transaction(async (tx) => {
    await tx.update(sites).set({ ...after, updatedAt: new Date() }).where(eq(sites.id, site.id));
    await recordAudit(tx, { actorId: user.id, action: "site.update", entityType: "site", entityId: site.id, before, after });
  });
  return { slug: site.slug };
}
