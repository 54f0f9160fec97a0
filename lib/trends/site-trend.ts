/**
 * A site's long-term trend and its comparison with a baseline, from nightly site values.
 *
 * The nightly series is the one defined in lib/sites/darkness.ts (reused, not redefined): a night's
 * site value is the median of the night medians of the site's APPROVED stations that had a usable
 * night (calibrated values, from night_summaries).
 *
 * - Trend: Mann–Kendall test and Theil–Sen slope with Sen's confidence interval on the nightly
 *   values, x in years (days since 1970-01-01 / 365.25); the seasonal Kendall variant with the
 *   calendar month as the season (Hirsch, Slack & Smith 1982). Slopes in mag/arcsec² per year
 *   (negative = getting brighter) and in % brighter per year, 100·(10^(−0.4·s) − 1).
 * - Minimum data: at least `minNights` usable nights (30) in at least `minDistinctMonths` distinct
 *   calendar months (6). lib/stats/trend.ts's enoughForTrend checks a span, not distinct months, so
 *   the distinct-month rule lives here.
 * - Baseline: the median of the last N usable nights against the median of the same calendar window
 *   in a baseline year (default: one year earlier) or a fixed period set by the steward.
 *
 * Everything but `loadSiteNights` is pure.
 */
import { sql } from "drizzle-orm";
import type { Db } from "@/db";
import { siteNightValuesSql, type NightValue } from "@/lib/sites/darkness";
import { brighteningPercentPerYear, magDiffToRatio } from "@/lib/photometry";
import { median } from "@/lib/stats/robust";
import { mannKendall, seasonalKendall, theilSen } from "@/lib/stats/trend";

export type { NightValue };

export const TREND_DEFAULTS = { minNights: 30, minDistinctMonths: 6, alpha: 0.05 } as const;
export const YEAR_DAYS = 365.25;

const NIGHT_RE = /^\d{4}-\d{2}-\d{2}$/;

/** Days since 1970-01-01 of a YYYY-MM-DD night. */
export function dayNumber(night: string): number {
  if (!NIGHT_RE.test(night)) throw new RangeError(`not a YYYY-MM-DD night: ${night}`);
  return Date.parse(`${night}T00:00:00Z`) / 86_400_000;
}

/** Shifts a YYYY-MM-DD date by whole years; 29 February becomes 28 February in a common year. */
export function shiftYears(night: string, years: number): string {
  const y = Number(night.slice(0, 4)) + years;
  const m = Number(night.slice(5, 7));
  let d = Number(night.slice(8, 10));
  const last = new Date(Date.UTC(y, m, 0)).getUTCDate();
  if (d > last) d = last;
  return `${String(y).padStart(4, "0")}-${String(m).padStart(2, "0")}-${String(d).padStart(2, "0")}`;
}

function sortByNight(values: readonly NightValue[]): NightValue[] {
  const seen = new Map<string, NightValue>();
  for (const v of values) {
    if (!NIGHT_RE.test(v.night)) throw new RangeError(`not a YYYY-MM-DD night: ${v.night}`);
    if (!Number.isFinite(v.mag)) throw new RangeError(`night ${v.night} has a non-finite value`);
    seen.set(v.night, v);
  }
  return [...seen.values()].sort((a, b) => (a.night < b.night ? -1 : a.night > b.night ? 1 : 0));
}

// ---------------------------------------------------------------------------------------------
// Minimum data
// ---------------------------------------------------------------------------------------------

export type EnoughData = { ok: boolean; nights: number; months: number; message: string };

/** ≥ minNights usable nights in ≥ minDistinctMonths distinct calendar months (YYYY-MM). */
export function enoughNights(
  values: readonly { night: string }[],
  opts: { minNights?: number; minDistinctMonths?: number } = {},
): EnoughData {
  const minNights = opts.minNights ?? TREND_DEFAULTS.minNights;
  const minMonths = opts.minDistinctMonths ?? TREND_DEFAULTS.minDistinctMonths;
  const nights = new Set(values.map((v) => v.night)).size;
  const months = new Set(values.map((v) => v.night.slice(0, 7))).size;
  const problems: string[] = [];
  if (nights < minNights) problems.push(`${nights} of the ${minNights} usable nights needed`);
  if (months < minMonths) problems.push(`${months} of the ${minMonths} different months needed`);
  if (problems.length > 0)
    return {
      ok: false,
      nights,
      months,
      message: `Not enough nights yet: ${problems.join(" and ")}.`,
    };
  return {
    ok: true,
    nights,
    months,
    message: `${nights} usable nights in ${months} different months.`,
  };
}

// ---------------------------------------------------------------------------------------------
// Trend
// ---------------------------------------------------------------------------------------------

export type TrendOptions = { alpha?: number; minNights?: number; minDistinctMonths?: number };

export type SiteTrendOk = {
  status: "ok";
  message: string;
  nights: number;
  months: number;
  firstNight: string;
  lastNight: string;
  alpha: number;
  /** Theil–Sen slope and its (1 − alpha) confidence interval, mag/arcsec² per year. */
  slopeMagPerYear: number;
  lowerMagPerYear: number;
  upperMagPerYear: number;
  /** Trend line: value = interceptMag + slope · (days since 1970-01-01 / 365.25). */
  interceptMag: number;
  /** % brighter per year for the slope and its interval (a negative slope gives a positive %). */
  brighteningPercentPerYear: number;
  brighteningPercentLower: number;
  brighteningPercentUpper: number;
  mannKendall: { s: number; z: number; p: number; tau: number };
  seasonal: { s: number; z: number; p: number; slopeMagPerYear: number; seasons: number } | null;
  /** Mann–Kendall p < alpha. */
  significant: boolean;
  direction: "brightening" | "darkening" | "none";
};

export type SiteTrendResult =
  SiteTrendOk | { status: "not-enough"; message: string; nights: number; months: number };

/** The trend of a nightly series (any order; one value per night). */
export function siteTrend(values: readonly NightValue[], opts: TrendOptions = {}): SiteTrendResult {
  const alpha = opts.alpha ?? TREND_DEFAULTS.alpha;
  const series = sortByNight(values);
  const enough = enoughNights(series, opts);
  // Mann–Kendall needs 3 values and Theil–Sen 2 whatever the configured minimum.
  if (!enough.ok || series.length < 3) {
    return {
      status: "not-enough",
      message: enough.ok ? "Not enough nights yet: at least 3 are needed." : enough.message,
      nights: enough.nights,
      months: enough.months,
    };
  }
  const x = series.map((v) => dayNumber(v.night) / YEAR_DAYS);
  const y = series.map((v) => v.mag);
  const ts = theilSen(x, y, alpha, { maxPairs: 2_000_000 });
  const mk = mannKendall(y);
  let seasonal: SiteTrendOk["seasonal"] = null;
  try {
    const sk = seasonalKendall(
      series.map((v, i) => ({ season: Number(v.night.slice(5, 7)), x: x[i]!, y: v.mag })),
    );
    seasonal = {
      s: sk.s,
      z: sk.z,
      p: sk.p,
      slopeMagPerYear: sk.slope,
      seasons: sk.seasons.filter((s) => s.n >= 2).length,
    };
  } catch {
    seasonal = null; // no month with two nights: the seasonal test is undefined
  }
  const significant = mk.p < alpha;
  return {
    status: "ok",
    message: enough.message,
    nights: enough.nights,
    months: enough.months,
    firstNight: series[0]!.night,
    lastNight: series[series.length - 1]!.night,
    alpha,
    slopeMagPerYear: ts.slope,
    lowerMagPerYear: ts.lower,
    upperMagPerYear: ts.upper,
    interceptMag: ts.intercept,
    brighteningPercentPerYear: brighteningPercentPerYear(ts.slope),
    // The % scale runs the other way: the lower slope limit is the faster brightening.
    brighteningPercentLower: brighteningPercentPerYear(ts.upper),
    brighteningPercentUpper: brighteningPercentPerYear(ts.lower),
    mannKendall: { s: mk.s, z: mk.z, p: mk.p, tau: mk.tau },
    seasonal,
    significant,
    direction: !significant
      ? "none"
      : ts.slope < 0
        ? "brightening"
        : ts.slope > 0
          ? "darkening"
          : "none",
  };
}

// ---------------------------------------------------------------------------------------------
// Baseline comparison
// ---------------------------------------------------------------------------------------------

export type BaselineSpec =
  /** The same calendar window `years` years before the recent window (default 1). */
  | { kind: "years-back"; years?: number }
  /** The same calendar window in a chosen year. */
  | { kind: "year"; year: number }
  /** A fixed period set by the steward (inclusive). */
  | { kind: "period"; from: string; to: string };

export type BaselineOptions = {
  /** How many of the last usable nights make the recent window (default 30). */
  recentNights?: number;
  baseline?: BaselineSpec;
  /** Fewest baseline nights for a comparison (default 10). */
  minBaselineNights?: number;
};

export type WindowSummary = { from: string; to: string; nights: number; medianMag: number };

export type BaselineComparison =
  | {
      status: "ok";
      recent: WindowSummary;
      baseline: WindowSummary & { label: string };
      /** recent − baseline in mag/arcsec²: NEGATIVE means the sky is brighter now. */
      diffMag: number;
      /** How much brighter the recent sky is, in % (negative = darker): 100·(10^(−0.4·diff) − 1). */
      brighterPercent: number;
    }
  | { status: "not-enough"; message: string };

/** The median of the last N usable nights against a baseline window (see BaselineSpec). */
export function compareWithBaseline(
  values: readonly NightValue[],
  opts: BaselineOptions = {},
): BaselineComparison {
  const n = opts.recentNights ?? 30;
  const minBase = opts.minBaselineNights ?? 10;
  const spec: BaselineSpec = opts.baseline ?? { kind: "years-back", years: 1 };
  const series = sortByNight(values);
  if (series.length < n)
    return {
      status: "not-enough",
      message: `Not enough nights yet: ${series.length} of the ${n} recent usable nights needed.`,
    };
  const recent = series.slice(-n);
  const from = recent[0]!.night;
  const to = recent[recent.length - 1]!.night;
  let bFrom: string;
  let bTo: string;
  let label: string;
  if (spec.kind === "period") {
    if (!NIGHT_RE.test(spec.from) || !NIGHT_RE.test(spec.to) || spec.from > spec.to)
      return { status: "not-enough", message: "The baseline period is not a valid date range." };
    [bFrom, bTo] = [spec.from, spec.to];
    label = `the baseline period ${bFrom} to ${bTo}`;
  } else {
    const back = spec.kind === "year" ? Number(to.slice(0, 4)) - spec.year : (spec.years ?? 1);
    if (back < 1)
      return {
        status: "not-enough",
        message: "The baseline year must be before the recent nights.",
      };
    bFrom = shiftYears(from, -back);
    bTo = shiftYears(to, -back);
    label =
      spec.kind === "year"
        ? `the same dates in ${spec.year}`
        : back === 1
          ? "the same dates a year earlier"
          : `the same dates ${back} years earlier`;
  }
  // Baseline nights never overlap the recent window.
  const base = series.filter((v) => v.night >= bFrom && v.night <= bTo && v.night < from);
  if (base.length < minBase)
    return {
      status: "not-enough",
      message: `Not enough nights yet: ${base.length} of the ${minBase} baseline nights needed in ${label}.`,
    };
  const recentMedian = median(recent.map((v) => v.mag));
  const baseMedian = median(base.map((v) => v.mag));
  const diffMag = recentMedian - baseMedian;
  return {
    status: "ok",
    recent: { from, to, nights: recent.length, medianMag: recentMedian },
    baseline: { from: bFrom, to: bTo, nights: base.length, medianMag: baseMedian, label },
    diffMag,
    brighterPercent: brighterPercent(diffMag),
  };
}

/** % brighter for a change of `diffMag` (negative diff = brighter): 100·(10^(−0.4·diff) − 1). */
export function brighterPercent(diffMag: number): number {
  return 100 * (magDiffToRatio(-diffMag) - 1);
}

// ---------------------------------------------------------------------------------------------
// Step search
// ---------------------------------------------------------------------------------------------

export type StepResult = {
  /** First night after the change point. */
  night: string;
  /** median(after) − median(before), mag/arcsec² (negative = brighter after). */
  shiftMag: number;
  before: WindowSummary;
  after: WindowSummary;
};

/**
 * The largest shift between two adjacent windows of `windowNights` usable nights, over every
 * change point among the nights on or after `sinceNight` (windows may reach back before it).
 * `direction` "brighter" looks only for brightening (negative) shifts. null when fewer than
 * 2 × windowNights nights are available.
 */
export function largestStep(
  values: readonly NightValue[],
  opts: { windowNights?: number; sinceNight?: string; direction?: "brighter" | "either" } = {},
): StepResult | null {
  const k = opts.windowNights ?? 14;
  const series = sortByNight(values);
  let best: StepResult | null = null;
  for (let i = k; i + k <= series.length; i++) {
    if (opts.sinceNight && series[i]!.night < opts.sinceNight) continue;
    const before = series.slice(i - k, i);
    const after = series.slice(i, i + k);
    const mb = median(before.map((v) => v.mag));
    const ma = median(after.map((v) => v.mag));
    const shift = ma - mb;
    const score = opts.direction === "either" ? Math.abs(shift) : -shift;
    const bestScore = best
      ? opts.direction === "either"
        ? Math.abs(best.shiftMag)
        : -best.shiftMag
      : -Infinity;
    if (score > bestScore) {
      // Adjacent change points give nearly the same shift (a window's median is robust to a few
      // nights from the other side), so date the step by the first night of the later window
      // that sits nearer the later median than the earlier one.
      const first = after.find((v) => Math.abs(v.mag - ma) < Math.abs(v.mag - mb)) ?? after[0]!;
      best = {
        night: first.night,
        shiftMag: shift,
        before: { from: before[0]!.night, to: before[k - 1]!.night, nights: k, medianMag: mb },
        after: { from: after[0]!.night, to: after[k - 1]!.night, nights: k, medianMag: ma },
      };
    }
  }
  return best;
}

// ---------------------------------------------------------------------------------------------
// Loading
// ---------------------------------------------------------------------------------------------

const day = (v: unknown) =>
  v instanceof Date ? v.toISOString().slice(0, 10) : String(v).slice(0, 10);

/** A site's nightly values (lib/sites/darkness.ts definition), oldest first. */
export async function loadSiteNights(
  db: Pick<Db, "execute">,
  siteId: string,
  range: { from?: string; to?: string } = {},
): Promise<(NightValue & { stations: number })[]> {
  const rows = await db.execute<{ night: unknown; value_mag: number; stations: number }>(
    sql`SELECT night::text AS night, value_mag, stations FROM (${siteNightValuesSql(sql`${siteId}::uuid`, range.from ?? null, range.to ?? null)}) nv ORDER BY night`,
  );
  return rows.rows.map((r) => ({
    night: day(r.night),
    mag: Number(r.value_mag),
    stations: Number(r.stations),
  }));
}
