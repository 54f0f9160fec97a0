/**
 * A site's darkness, defined once here and used by the map, the site pages and their JSON routes.
 *
 * - Usable night (of a station): a night summary with a median (some usable readings) and at least
 *   USABLE_NIGHT_MIN_READINGS usable readings, so one stray reading between clouds does not make a night.
 * - A night's site value: the median of the night medians of the site's APPROVED stations that had a
 *   usable night (unapproved stations inside the boundary do not count; retired stations' past nights do).
 *   Night medians are calibrated values (raw + the station's calibration offset, see ingest/summarise.ts).
 * - The site's darkness now: the median over the last DARKNESS_NOW_NIGHTS (30) nights that have a site
 *   value, with their spread as the interquartile range (quartiles by linear interpolation, R type 7,
 *   the same as PostgreSQL's percentile_cont).
 * - A station's darkness on the map: the median of its own last 30 usable nights, same rules.
 * Medians of nightly values are computed in PostgreSQL from night_summaries, never from raw readings.
 */
import { sql, type SQL } from "drizzle-orm";
import { convertAll, type BortleApprox } from "@/lib/photometry";
import { iqr, median, quantile } from "@/lib/stats/robust";

export const USABLE_NIGHT_MIN_READINGS = 3;
export const DARKNESS_NOW_NIGHTS = 30;

/** SQL predicate: the night summary aliased `ns` is a usable night. */
export const usableNightSql: SQL = sql.raw(`ns.median_mag IS NOT NULL AND ns.usable_readings >= ${USABLE_NIGHT_MIN_READINGS}`);

export type NightValue = { night: string; mag: number };

export type Darkness = {
  medianMag: number;
  q1Mag: number;
  q3Mag: number;
  iqrMag: number;
  nights: number;
  firstNight: string;
  lastNight: string;
};

/** The darkness now from nightly site values (any order): last `n` nights by date. */
export function darknessNow(values: readonly NightValue[], n = DARKNESS_NOW_NIGHTS): Darkness | null {
  const recent = [...values].sort((a, b) => (a.night < b.night ? -1 : a.night > b.night ? 1 : 0)).slice(-n);
  if (recent.length === 0) return null;
  const mags = recent.map((v) => v.mag);
  return {
    medianMag: median(mags),
    q1Mag: quantile(mags, 0.25),
    q3Mag: quantile(mags, 0.75),
    iqrMag: iqr(mags),
    nights: recent.length,
    firstNight: recent[0]!.night,
    lastNight: recent[recent.length - 1]!.night,
  };
}

export type PlainTerms = {
  luminanceMcdM2: number;
  ratioToNatural: number;
  artificialPercent: number;
  nelm: number;
  bortleApprox: BortleApprox;
};

/** What a value in mag/arcsec² means in plain terms (lib/photometry.ts). */
export function plainTerms(magArcsec2: number, naturalMag?: number): PlainTerms {
  const c = convertAll(magArcsec2, naturalMag === undefined ? {} : { naturalMag });
  return {
    luminanceMcdM2: c.luminanceMcdM2,
    ratioToNatural: c.ratioToNatural,
    artificialPercent: c.artificialPercent,
    nelm: c.nelm,
    bortleApprox: c.bortleApprox,
  };
}

/**
 * SQL (a subquery yielding site_id, night, value_mag, stations) of nightly site values for the sites
 * whose ids `siteIds` selects, nights between `from` and `to` when given.
 */
export function siteNightValuesSql(siteIds: SQL, from: string | null, to: string | null): SQL {
  return sql`
    SELECT st.site_id, ns.night,
           percentile_cont(0.5) WITHIN GROUP (ORDER BY ns.median_mag)::float8 AS value_mag,
           count(*)::int AS stations
      FROM night_summaries ns
      JOIN stations st ON st.id = ns.station_id
     WHERE st.site_id IN (${siteIds})
       AND st.approval = 'approved'
       AND ${usableNightSql}
       ${from ? sql`AND ns.night >= ${from}::date` : sql``}
       ${to ? sql`AND ns.night <= ${to}::date` : sql``}
     GROUP BY st.site_id, ns.night`;
}
