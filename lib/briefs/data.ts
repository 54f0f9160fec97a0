/**
 * The data behind a hearing brief, gathered once for sites + period and then rendered
 * (lib/briefs/render.tsx). Every number comes from the functions the rest of the app uses:
 * - nightly site values: lib/sites/darkness.ts (through lib/trends/site-trend.ts loadSiteNights), the
 *   same series the site page and its JSON summary use;
 * - darkness: darknessNow (lib/sites/darkness.ts), once over every night of the period and once over
 *   the period's last 30 nights (the site page's "darkness now" when the period ends today);
 * - plain terms: plainTerms / convertAll (lib/photometry.ts);
 * - trend: siteTrend (lib/trends/site-trend.ts: Theil–Sen with Sen's interval, Mann–Kendall, seasonal Kendall);
 * - uncertainty of the period median: IQR (R type 7) and the distribution-free order-statistic
 *   interval (lib/briefs/median-ci.ts).
 * The verification code is computed from `evidence` (lib/briefs/verification.ts).
 */
import { and, eq, inArray, sql } from "drizzle-orm";
import type { Polygon, MultiPolygon } from "geojson";
import type { Db } from "@/db";
import { glowEstimates, sites, type GlowExistingSource, type GlowProposed, type GlowSiteResult } from "@/db/schema";
import { flagNames } from "@/lib/flags";
import { GLOW_ESTIMATE_CAUTION, WALKER_DISTANCE_EXPONENT, WALKER_VALID_MAX_KM, WALKER_VALID_MIN_KM } from "@/lib/glow";
import { convertAll } from "@/lib/photometry";
import { roundPosition } from "@/lib/sites/access";
import { darknessNow, plainTerms, DARKNESS_NOW_NIGHTS, USABLE_NIGHT_MIN_READINGS, type Darkness, type PlainTerms } from "@/lib/sites/darkness";
import { median } from "@/lib/stats/robust";
import { brighterPercent, loadSiteNights, shiftYears, siteTrend, type SiteTrendResult } from "@/lib/trends/site-trend";
import { nightBounds } from "@/ingest/night";
import { medianConfidenceInterval, type MedianCi } from "./median-ci";
import { NIGHTMARK_VERSION } from "./version";
import { verificationFor } from "./verification";

export { GLOW_ESTIMATE_CAUTION };

/** The cautions every brief prints (PRODUCT.md, "Cautions the product shows: reports and estimates"). */
export const BRIEF_CAUTIONS = [
  "Readings and estimates are approximations with stated uncertainty: every number in this brief comes with its spread, interval or range of validity, and should be read with it.",
  "A zenith reading is not a compliance measurement: a sky-quality meter measures the brightness of the sky overhead, not the light from any one fixture, and not the quantities that lighting codes regulate.",
  "Lighting design and code compliance belong to qualified lighting professionals and the local codes. This brief is evidence about the night sky at the sites named, not a lighting design or a code assessment.",
] as const;

/** Baseline comparisons need at least this many nights in the year-earlier window. */
export const BASELINE_MIN_NIGHTS = 10;

const day = (v: unknown) => (v instanceof Date ? v.toISOString().slice(0, 10) : String(v).slice(0, 10));
const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));

export type BriefStation = {
  slug: string;
  name: string;
  status: string;
  approval: string;
  countsTowardSite: boolean;
  lat: number;
  lon: number;
  positionRounded: boolean;
  elevationM: number | null;
  device: string;
  timeZone: string;
};

export type FlagTotals = { readings: number; usable: number; daylight: number; twilight: number; moonlit: number; cloudSuspect: number; outOfRange: number };

export type NightRow = {
  station: string;
  night: string;
  readings: number;
  usableReadings: number;
  medianMag: number | null;
  calibrationOffsetMag: number;
  flagCounts: Record<string, number>;
};

export type SiteBrief = {
  site: {
    id: string;
    slug: string;
    name: string;
    description: string;
    timeZone: string;
    targetMag: number;
    naturalSkyMag: number;
    lightingZone: string | null;
    isPublic: boolean;
    boundary: Polygon | MultiPolygon;
    thresholds: { sunMaxAltDeg: number; moonMaxAltDeg: number; cloudWindowMin: number; cloudSpreadMag: number };
  };
  stations: BriefStation[];
  /** Nightly site values in the period (oldest first). */
  nights: { night: string; mag: number; stations: number }[];
  headline: null | {
    period: Darkness & { ci: MedianCi };
    /** The site page's definition (last 30 nights) at the end of the period. */
    endOfPeriod: Darkness;
    plain: PlainTerms;
    plainEnd: PlainTerms;
    meetsTarget: boolean;
  };
  trend: SiteTrendResult;
  baseline:
    | { status: "ok"; from: string; to: string; nights: number; medianMag: number; periodMedianMag: number; periodNights: number; diffMag: number; brighterPercent: number }
    | { status: "not-enough"; from: string; to: string; nights: number; message: string };
  /** Month-by-year medians of nightly site values up to the period's end (seasonal comparison). */
  seasonal: { year: number; month: number; medianMag: number; nights: number }[];
  screening: {
    totals: FlagTotals;
    stationNights: number;
    usableStationNights: number;
  };
  calibrations: { station: string; effectiveFrom: string; offsetMag: number; note: string; inForce: boolean }[];
  provenance: {
    stations: { slug: string; bySource: Record<string, number>; readings: number; nights: number; usableNights: number }[];
    uploads: { station: string; filename: string; sha256: string; sizeBytes: number; uploadedAt: string; accepted: number }[];
  };
  nightRows: NightRow[];
};

export type BriefGlow = {
  id: string;
  name: string;
  createdAt: string;
  proposed: GlowProposed;
  existingSources: GlowExistingSource[];
  results: GlowSiteResult[];
};

export type BriefData = {
  generatedAt: string;
  softwareVersion: string;
  period: { from: string; to: string };
  sites: SiteBrief[];
  glowEstimates: BriefGlow[];
  methods: { topic: string; text: string; source: string }[];
  cautions: readonly string[];
  verification: { code: string; sha256: string; nightRows: number; stations: number };
};

/** The data the verification code covers: everything that decides a number in the brief. */
export function evidenceOf(data: Omit<BriefData, "verification" | "methods" | "cautions" | "generatedAt">) {
  return {
    softwareVersion: data.softwareVersion,
    period: data.period,
    sites: data.sites.map((s) => ({
      slug: s.site.slug,
      name: s.site.name,
      timeZone: s.site.timeZone,
      targetMag: s.site.targetMag,
      naturalSkyMag: s.site.naturalSkyMag,
      thresholds: s.site.thresholds,
      usableNightMinReadings: USABLE_NIGHT_MIN_READINGS,
      stations: s.stations.map((st) => ({ slug: st.slug, approval: st.approval, status: st.status, lat: st.lat, lon: st.lon })),
      calibrations: s.calibrations,
      nightRows: s.nightRows,
    })),
    glowEstimates: data.glowEstimates.map((g) => ({ id: g.id, proposed: g.proposed, existingSources: g.existingSources, results: g.results })),
  };
}

async function gatherSite(db: Db, siteId: string, from: string, to: string): Promise<SiteBrief> {
  const [site] = await db.select().from(sites).where(eq(sites.id, siteId)).limit(1);
  if (!site) throw new Error(`site ${siteId} no longer exists`);

  const stationRows = await db.execute<{
    id: string; slug: string; name: string; status: string; approval: string; lat: number; lon: number;
    elevation_m: number | null; device_description: string; time_zone: string;
  }>(sql`SELECT id, slug, name, status, approval, lat, lon, elevation_m, device_description, time_zone
           FROM stations WHERE site_id = ${siteId}::uuid ORDER BY name`);
  // Station positions can be a volunteer's garden: rounded to ~1 km when the site asks for it on its
  // public side, because a brief is made to be shown in public.
  const round = site.roundPublicPositions;
  const stations: (BriefStation & { id: string })[] = stationRows.rows.map((r) => {
    const pos = round ? roundPosition(Number(r.lat), Number(r.lon)) : { lat: Number(r.lat), lon: Number(r.lon) };
    return {
      id: r.id,
      slug: r.slug,
      name: r.name,
      status: r.status,
      approval: r.approval,
      countsTowardSite: r.approval === "approved",
      ...pos,
      positionRounded: round,
      elevationM: num(r.elevation_m),
      device: r.device_description,
      timeZone: r.time_zone,
    };
  });
  const approved = stations.filter((s) => s.countsTowardSite);
  const bySlug = new Map(stations.map((s) => [s.id, s.slug]));

  // Nightly site values: all of them up to the period's end (seasonal chart, baseline), then the period.
  const allNights = await loadSiteNights(db, site.id, { to });
  const nights = allNights.filter((n) => n.night >= from);
  const dnPeriod = darknessNow(nights, Number.POSITIVE_INFINITY);
  const dnEnd = darknessNow(nights, DARKNESS_NOW_NIGHTS);
  const headline =
    dnPeriod && dnEnd
      ? {
          period: { ...dnPeriod, ci: medianConfidenceInterval(nights.map((n) => n.mag)) },
          endOfPeriod: dnEnd,
          plain: plainTerms(dnPeriod.medianMag, site.naturalSkyMag),
          plainEnd: plainTerms(dnEnd.medianMag, site.naturalSkyMag),
          meetsTarget: dnPeriod.medianMag >= site.targetMag,
        }
      : null;

  const trend = siteTrend(nights);

  // Baseline: the same dates one year earlier, never overlapping the period.
  const bFrom = shiftYears(from, -1);
  const bTo = shiftYears(to, -1);
  const base = allNights.filter((n) => n.night >= bFrom && n.night <= bTo && n.night < from);
  const baseline: SiteBrief["baseline"] =
    base.length >= BASELINE_MIN_NIGHTS && dnPeriod
      ? (() => {
          const baseMedian = median(base.map((n) => n.mag));
          const diffMag = dnPeriod.medianMag - baseMedian;
          return { status: "ok" as const, from: bFrom, to: bTo, nights: base.length, medianMag: baseMedian, periodMedianMag: dnPeriod.medianMag, periodNights: dnPeriod.nights, diffMag, brighterPercent: brighterPercent(diffMag) };
        })()
      : {
          status: "not-enough",
          from: bFrom,
          to: bTo,
          nights: base.length,
          message: `Not enough nights for a baseline: ${base.length} of the ${BASELINE_MIN_NIGHTS} needed between ${bFrom} and ${bTo}.`,
        };

  const byMonth = new Map<string, number[]>();
  for (const n of allNights) {
    const k = n.night.slice(0, 7);
    const a = byMonth.get(k) ?? [];
    a.push(n.mag);
    byMonth.set(k, a);
  }
  const seasonal = [...byMonth.entries()]
    .sort(([a], [b]) => (a < b ? -1 : 1))
    .map(([k, mags]) => ({ year: Number(k.slice(0, 4)), month: Number(k.slice(5, 7)), medianMag: median(mags), nights: mags.length }));

  // Per-station night summaries of the approved stations (the rows the site values come from).
  const ids = approved.map((s) => s.id);
  const nightRowsRaw = ids.length
    ? await db.execute<{
        station_id: string; night: unknown; readings: number; usable_readings: number; median_mag: number | null;
        calibration_offset_mag: number; flag_counts: Record<string, number>;
      }>(sql`SELECT station_id, night::text AS night, readings, usable_readings, median_mag, calibration_offset_mag, flag_counts
               FROM night_summaries
              WHERE station_id IN (${sql.join(ids.map((i) => sql`${i}::uuid`), sql`, `)})
                AND night >= ${from}::date AND night <= ${to}::date
              ORDER BY night, station_id`)
    : { rows: [] };
  const nightRows: NightRow[] = nightRowsRaw.rows
    .map((r) => ({
      station: bySlug.get(r.station_id)!,
      night: day(r.night),
      readings: Number(r.readings),
      usableReadings: Number(r.usable_readings),
      medianMag: num(r.median_mag),
      calibrationOffsetMag: Number(r.calibration_offset_mag),
      flagCounts: r.flag_counts ?? {},
    }))
    .sort((a, b) => (a.night < b.night ? -1 : a.night > b.night ? 1 : a.station < b.station ? -1 : a.station > b.station ? 1 : 0));

  const totals: FlagTotals = { readings: 0, usable: 0, daylight: 0, twilight: 0, moonlit: 0, cloudSuspect: 0, outOfRange: 0 };
  let usableStationNights = 0;
  for (const r of nightRows) {
    totals.readings += r.readings;
    totals.usable += r.usableReadings;
    for (const k of ["daylight", "twilight", "moonlit", "cloudSuspect", "outOfRange"] as const) totals[k] += Number(r.flagCounts[k] ?? 0);
    if (r.medianMag !== null && r.usableReadings >= USABLE_NIGHT_MIN_READINGS) usableStationNights++;
  }

  const calRows = stations.length
    ? await db.execute<{ station_id: string; effective_from: unknown; offset_mag: number; note: string }>(sql`
        SELECT station_id, effective_from::text AS effective_from, offset_mag, note FROM calibrations
         WHERE station_id IN (${sql.join(stations.map((s) => sql`${s.id}::uuid`), sql`, `)})
         ORDER BY station_id, effective_from`)
    : { rows: [] };
  const calibrations = calRows.rows.map((c, i, all) => {
    const next = all.slice(i + 1).find((x) => x.station_id === c.station_id);
    const effectiveFrom = day(c.effective_from);
    const until = next ? day(next.effective_from) : null;
    return {
      station: bySlug.get(c.station_id)!,
      effectiveFrom,
      offsetMag: Number(c.offset_mag),
      note: c.note,
      // In force for some night of the period: starts on or before its end and is not replaced before its start.
      inForce: effectiveFrom <= to && (until === null || until > from),
    };
  });

  // Readings per station and source in the period's nights (local noon to noon, each station's zone).
  const provStations: SiteBrief["provenance"]["stations"] = [];
  const uploads: SiteBrief["provenance"]["uploads"] = [];
  for (const st of approved) {
    const start = nightBounds(from, st.timeZone).start;
    const end = nightBounds(to, st.timeZone).end;
    const counts = await db.execute<{ source: string; n: number }>(sql`
      SELECT source::text AS source, count(*)::int AS n FROM readings
       WHERE station_id = ${st.id}::uuid AND taken_at >= ${start.toISOString()}::timestamptz AND taken_at < ${end.toISOString()}::timestamptz
       GROUP BY source ORDER BY source`);
    const bySource = Object.fromEntries(counts.rows.map((r) => [r.source, Number(r.n)]));
    const rows = nightRows.filter((r) => r.station === st.slug);
    provStations.push({
      slug: st.slug,
      bySource,
      readings: Object.values(bySource).reduce((a, b) => a + b, 0),
      nights: rows.length,
      usableNights: rows.filter((r) => r.medianMag !== null && r.usableReadings >= USABLE_NIGHT_MIN_READINGS).length,
    });
    const up = await db.execute<{ filename: string; sha256: string; size_bytes: number; created_at: Date; accepted: number }>(sql`
      SELECT u.filename, u.sha256, u.size_bytes, u.created_at, u.accepted FROM uploads u
       WHERE u.station_id = ${st.id}::uuid
         AND EXISTS (SELECT 1 FROM readings r WHERE r.station_id = ${st.id}::uuid AND r.upload_id = u.id
                       AND r.taken_at >= ${start.toISOString()}::timestamptz AND r.taken_at < ${end.toISOString()}::timestamptz)
       ORDER BY u.created_at`);
    for (const u of up.rows)
      uploads.push({ station: st.slug, filename: u.filename, sha256: u.sha256, sizeBytes: Number(u.size_bytes), uploadedAt: new Date(u.created_at).toISOString(), accepted: Number(u.accepted) });
  }

  return {
    site: {
      id: site.id,
      slug: site.slug,
      name: site.name,
      description: site.description,
      timeZone: site.timeZone,
      targetMag: site.targetMag,
      naturalSkyMag: site.naturalSkyMag,
      lightingZone: site.lightingZone,
      isPublic: site.isPublic,
      boundary: site.boundary,
      thresholds: { sunMaxAltDeg: site.sunMaxAltDeg, moonMaxAltDeg: site.moonMaxAltDeg, cloudWindowMin: site.cloudWindowMin, cloudSpreadMag: site.cloudSpreadMag },
    },
    stations: stations.map(({ id: _id, ...s }) => s),
    nights,
    headline,
    trend,
    baseline,
    seasonal,
    screening: { totals, stationNights: nightRows.length, usableStationNights },
    calibrations,
    provenance: { stations: provStations, uploads },
    nightRows,
  };
}

/** The methods section: what was computed and the published source of each step. */
export function methodsFor(hasGlow: boolean, naturalSkyMag = 22): BriefData["methods"] {
  const c = convertAll(naturalSkyMag, { naturalMag: naturalSkyMag }).constants;
  const flagList = [1, 2, 4, 8, 16].map((b) => flagNames(b)[0]).join(", ");
  const m: BriefData["methods"] = [
    {
      topic: "Measurement",
      text: "Zenith sky brightness in magnitudes per square arcsecond (mag/arcsec², V band); a bigger number is a darker sky and 5 magnitudes is a factor of 100 in brightness.",
      source: `${c.pogsonRatio.source} (ratio ${c.pogsonRatio.value.toFixed(6)} per magnitude).`,
    },
    {
      topic: "Screening",
      text: `Every reading is screened at the station's position and time: Sun and Moon altitudes and the Moon's illuminated fraction are computed with suncalc 2 and stored with the reading. Readings are flagged (${flagList}) when the Sun is above the site's limit, the Moon above the site's moon limit, consecutive readings vary more than the site's cloud spread within its cloud window, or the value is outside the meter's calibrated range; only unflagged readings count. suncalc returns refracted (apparent) altitudes; the thresholds are compared with the geometric (unrefracted) altitude, as twilight is defined on it.`,
      source: "Twilight limits: Explanatory Supplement to the Astronomical Almanac (civil 0° to −6°, nautical to −12°, astronomical to −18°). Cloud screening by the spread of consecutive readings: Hänel et al. 2018, JQSRT 205:278.",
    },
    {
      topic: "Nights and site values",
      text: `A station's night runs from local noon to local noon and is named by its evening date. A night counts when it has a median of at least ${USABLE_NIGHT_MIN_READINGS} usable readings (calibration offsets added; raw values never altered). A night's site value is the median of its approved stations' night medians.`,
      source: "Nightmark definitions (lib/sites/darkness.ts).",
    },
    {
      topic: "Headline and uncertainty",
      text: "The headline is the median of the nightly site values in the period, with the interquartile range (quartiles by linear interpolation, R type 7) as the spread and a 95 % distribution-free confidence interval for the median from order statistics. Consecutive nights are not fully independent, so that interval is, if anything, too narrow. The value for the period's last 30 nights uses the site page's definition of \"darkness now\".",
      source: "Order-statistic (sign-test) interval: Conover 1999, Practical Nonparametric Statistics, 3rd ed., §3.2. Quantiles: Hyndman & Fan 1996, The American Statistician 50:361 (type 7).",
    },
    {
      topic: "Plain terms",
      text: `Luminance L = K·10^(−0.4·m) with K = ${c.luminanceK.value.toExponential(3)} cd/m²; ratio to a natural sky of ${naturalSkyMag.toFixed(1)} mag/arcsec²; naked-eye limiting magnitude NELM = 7.93 − 5·log10(1 + 10^(4.316 − m/5)); Bortle class from commonly quoted mag/arcsec² ranges (approximate: the ranges are not in Bortle's article).`,
      source: `K: ${c.luminanceK.source}; the alternative K = ${c.falchi2016K.value.toExponential(3)} of ${c.falchi2016K.source} differs by about 2 %, and Bará et al. 2020 (MNRAS 493:2429) show K depends on the sky's spectrum. Natural sky: ${c.naturalSkyMag.source}. NELM: derived from Schaefer 1990 (PASP 102:212) with Garstang 1986. Bortle 2001, Sky & Telescope, Feb 2001.`,
    },
    {
      topic: "Trend",
      text: "Theil–Sen slope of the nightly site values against time in years with its 95 % confidence interval, the Mann–Kendall test (tie-corrected variance, continuity correction, two-sided p from the normal approximation) and the seasonal Kendall test with calendar months as seasons. A negative slope in mag/arcsec² per year means the sky is getting brighter; % brighter per year = 100·(10^(−0.4·slope) − 1). At least 30 usable nights in at least 6 different months are required.",
      source: "Mann 1945, Econometrica 13:245; Kendall 1975, Rank Correlation Methods; Theil 1950; Sen 1968, JASA 63:1379 (interval as in Gilbert 1987, Statistical Methods for Environmental Pollution Monitoring, §16.5); Hirsch, Slack & Smith 1982, Water Resources Research 18:107.",
    },
    {
      topic: "Baseline",
      text: `The period's median compared with the median of the same calendar dates one year earlier (at least ${BASELINE_MIN_NIGHTS} nights needed). The two windows may cover different months to different degrees; the seasonal chart shows the same months side by side.`,
      source: "Nightmark definition; Pogson ratio for the % difference.",
    },
  ];
  if (hasGlow)
    m.push({
      topic: "Glow estimate (what-if)",
      text: `Walker's law: the artificial zenith glow a town adds is proportional to its population × distance^−${WALKER_DISTANCE_EXPONENT}, roughly valid between ${WALKER_VALID_MIN_KM} and ${WALKER_VALID_MAX_KM} km. The site's measured artificial brightness (measured minus natural) is shared among the known existing sources by that law, and the proposed development is added at the same scale. Installed lumens are converted to an equivalent population at an assumed 1,000 lm per person (an assumption, not a published figure).`,
      source: "Walker 1977, PASP 89:405.",
    });
  return m;
}

/** Gathers everything a brief shows. `sitesIds` in the order the brief prints them. */
export async function gatherBriefData(
  db: Db,
  input: { siteIds: string[]; from: string; to: string; glowEstimateIds?: string[]; generatedAt?: Date },
): Promise<BriefData> {
  const siteBriefs: SiteBrief[] = [];
  for (const id of input.siteIds) siteBriefs.push(await gatherSite(db, id, input.from, input.to));
  const glowRows = input.glowEstimateIds?.length
    ? await db.select().from(glowEstimates).where(and(inArray(glowEstimates.id, input.glowEstimateIds))).orderBy(glowEstimates.createdAt)
    : [];
  const glow: BriefGlow[] = glowRows.map((g) => ({
    id: g.id,
    name: g.name,
    createdAt: g.createdAt.toISOString(),
    proposed: g.proposed,
    existingSources: g.existingSources,
    results: g.results,
  }));
  const base = {
    softwareVersion: NIGHTMARK_VERSION,
    period: { from: input.from, to: input.to },
    sites: siteBriefs,
    glowEstimates: glow,
  };
  const v = verificationFor(evidenceOf(base));
  return {
    ...base,
    generatedAt: (input.generatedAt ?? new Date()).toISOString(),
    methods: methodsFor(glow.length > 0, siteBriefs[0]?.site.naturalSkyMag ?? 22),
    cautions: BRIEF_CAUTIONS,
    verification: {
      code: v.code,
      sha256: v.sha256,
      nightRows: siteBriefs.reduce((a, s) => a + s.nightRows.length, 0),
      stations: siteBriefs.reduce((a, s) => a + s.stations.filter((x) => x.countsTowardSite).length, 0),
    },
  };
}
