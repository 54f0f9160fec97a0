/**
 * Non-parametric trend statistics for nightly sky-brightness series.
 *
 * - Mann–Kendall test: S = Σ_{i<j} sgn(x_j − x_i) with the tie-corrected variance
 *   Var(S) = [n(n−1)(2n+5) − Σ t(t−1)(2t+5)]/18 and the continuity-corrected
 *   Z = (S − sgn S)/√Var(S); two-sided p from the normal approximation.
 * - Theil–Sen slope (median of pairwise slopes) with the confidence interval of Sen 1968 as
 *   given by Gilbert 1987 (Statistical Methods for Environmental Pollution Monitoring, §16.5).
 * - Seasonal Kendall test and seasonal Sen slope (Hirsch, Slack & Smith 1982, Water Resources
 *   Research 18:107): S and Var(S) summed over seasons, no covariance correction between seasons.
 *
 * Pure module; inputs are never mutated.
 */

import { quantileSorted } from "./robust";

// ---------------------------------------------------------------------------------------------
// Normal distribution
// ---------------------------------------------------------------------------------------------

const TWO_OVER_SQRT_PI = 2 / Math.sqrt(Math.PI);
const ONE_OVER_SQRT_PI = 1 / Math.sqrt(Math.PI);

/** erf(x) for 0 ≤ x < 3: e^{−x²}·(2/√π)·Σ 2ⁿx^{2n+1}/(2n+1)!! (all terms positive, no cancellation). */
function erfSeries(x: number): number {
  const x2 = x * x;
  let term = x;
  let sum = x;
  for (let n = 1; n < 1000; n++) {
    term *= (2 * x2) / (2 * n + 1);
    sum += term;
    if (term < sum * 1e-17) break;
  }
  return TWO_OVER_SQRT_PI * Math.exp(-x2) * sum;
}

/**
 * erfc(x) for x ≥ 3 from the continued fraction
 * erfc(x) = e^{−x²}/√π · 1/(x + (1/2)/(x + 1/(x + (3/2)/(x + …)))), evaluated by Lentz's method.
 */
function erfcContinuedFraction(x: number): number {
  const tiny = 1e-300;
  let f = x;
  let c = f;
  let d = 0;
  for (let k = 1; k < 5000; k++) {
    const a = k / 2;
    d = x + a * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = x + a / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const delta = c * d;
    f *= delta;
    if (Math.abs(delta - 1) < 1e-16) break;
  }
  return (ONE_OVER_SQRT_PI * Math.exp(-x * x)) / f;
}

/** Complementary error function, relative accuracy ~1e-12 or better over the whole line. */
export function erfc(x: number): number {
  if (Number.isNaN(x)) return Number.NaN;
  if (x < 0) return 2 - erfc(-x);
  if (x === Number.POSITIVE_INFINITY) return 0;
  if (x < 3) return 1 - erfSeries(x);
  return erfcContinuedFraction(x);
}

/** Standard normal cumulative distribution Φ(z) = ½·erfc(−z/√2); absolute accuracy < 1e-15. */
export function normalCdf(z: number): number {
  return 0.5 * erfc(-z / Math.SQRT2);
}

/** Upper tail 1 − Φ(z), computed without cancellation for large z. */
export function normalSf(z: number): number {
  return 0.5 * erfc(z / Math.SQRT2);
}

/** Two-sided p-value of a standard normal statistic: 2·(1 − Φ(|z|)) = erfc(|z|/√2). */
export function twoSidedP(z: number): number {
  return erfc(Math.abs(z) / Math.SQRT2);
}

/** Inverse of the standard normal CDF (bisection on normalCdf, then Newton polish). */
export function normalQuantile(p: number): number {
  if (!Number.isFinite(p) || p <= 0 || p >= 1) {
    throw new RangeError(`normalQuantile: p must be strictly between 0 and 1 (got ${p})`);
  }
  let lo = -39;
  let hi = 39;
  for (let i = 0; i < 200 && hi - lo > 1e-13; i++) {
    const mid = 0.5 * (lo + hi);
    if (normalCdf(mid) < p) lo = mid;
    else hi = mid;
  }
  let z = 0.5 * (lo + hi);
  for (let i = 0; i < 3; i++) {
    const pdf = Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI);
    if (pdf < 1e-300) break;
    const step = (normalCdf(z) - p) / pdf;
    if (!Number.isFinite(step) || Math.abs(step) > 1e-6) break;
    z -= step;
  }
  return z;
}

// ---------------------------------------------------------------------------------------------
// Helpers
// ---------------------------------------------------------------------------------------------

function checkFiniteArray(name: string, values: ArrayLike<number>): void {
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (typeof v !== "number" || !Number.isFinite(v)) {
      throw new RangeError(`${name}: value at index ${i} is not a finite number (${String(v)})`);
    }
  }
}

function sign(d: number): number {
  return d > 0 ? 1 : d < 0 ? -1 : 0;
}

/** Σ t(t−1)(2t+5) over groups of exactly equal values. */
function tieTerm(values: ArrayLike<number>): number {
  const sorted = Float64Array.from(values as ArrayLike<number>);
  sorted.sort();
  let sum = 0;
  let run = 1;
  for (let i = 1; i <= sorted.length; i++) {
    if (i < sorted.length && sorted[i] === sorted[i - 1]) {
      run++;
    } else {
      if (run > 1) sum += run * (run - 1) * (2 * run + 5);
      run = 1;
    }
  }
  return sum;
}

/** 18 × the Mann–Kendall variance (an integer), so that sums over seasons stay exact. */
function mkVariance18(values: ArrayLike<number>): number {
  const n = values.length;
  return n * (n - 1) * (2 * n + 5) - tieTerm(values);
}

/** Mann–Kendall variance with the tie correction. */
function mkVariance(values: ArrayLike<number>): number {
  return mkVariance18(values) / 18;
}

function zFromS(s: number, varS: number): number {
  if (varS <= 0) return 0;
  return (s - sign(s)) / Math.sqrt(varS);
}

// ---------------------------------------------------------------------------------------------
// Mann–Kendall
// ---------------------------------------------------------------------------------------------

export interface MannKendallResult {
  n: number;
  /** Kendall's S. */
  s: number;
  /** Tie-corrected variance of S. */
  varS: number;
  /** Continuity-corrected normal score (S − sgn S)/√Var(S). */
  z: number;
  /** Two-sided p-value from the normal approximation. */
  p: number;
  /** Kendall's tau-a: S / (n(n−1)/2). */
  tau: number;
}

/**
 * Mann–Kendall trend test on values in time order (index order). O(n²) comparisons:
 * ~2M for 2,000 values, a few milliseconds.
 */
export function mannKendall(values: ArrayLike<number>): MannKendallResult {
  const n = values.length;
  if (n < 3) throw new RangeError(`mannKendall: needs at least 3 values (got ${n})`);
  checkFiniteArray("mannKendall", values);
  let s = 0;
  for (let i = 0; i < n - 1; i++) {
    const vi = values[i] as number;
    for (let j = i + 1; j < n; j++) {
      const d = (values[j] as number) - vi;
      if (d > 0) s++;
      else if (d < 0) s--;
    }
  }
  const varS = mkVariance(values);
  const z = zFromS(s, varS);
  return { n, s, varS, z, p: varS > 0 ? twoSidedP(z) : 1, tau: s / ((n * (n - 1)) / 2) };
}

// ---------------------------------------------------------------------------------------------
// Theil–Sen
// ---------------------------------------------------------------------------------------------

export interface TheilSenOptions {
  /**
   * Above this many pairs the slopes are estimated from a random sample of `maxPairs` pairs
   * (deterministic seed) instead of all n(n−1)/2: the slope and interval are then approximate
   * and `sampled` is true. Default 5,000,000 pairs (≈ 3,160 points, 40 MB of Float64).
   */
  maxPairs?: number;
  /** Seed of the sampling generator (only used when sampling). */
  seed?: number;
}

export interface TheilSenResult {
  slope: number;
  /** Median of y − slope·x. */
  intercept: number;
  /** Lower limit of the (1 − alpha) confidence interval for the slope. */
  lower: number;
  /** Upper limit of the (1 − alpha) confidence interval for the slope. */
  upper: number;
  n: number;
  /** Number of pairs with distinct x (N′ in Gilbert 1987). */
  pairs: number;
  alpha: number;
  /** True when the slopes came from a random sample of pairs (see TheilSenOptions.maxPairs). */
  sampled: boolean;
}

/** Small deterministic PRNG (mulberry32) for reproducible pair sampling. */
function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * Rearranges a[lo..hi] (inclusive) so that a[k] holds the value it would have if sorted, with
 * smaller-or-equal values before it and greater-or-equal after (three-way quickselect with a
 * deterministic pseudo-random pivot: expected O(n), robust to many equal values).
 */
function selectInPlace(a: Float64Array, k: number, rand: () => number): void {
  let lo = 0;
  let hi = a.length - 1;
  while (lo < hi) {
    const pivot = a[lo + Math.floor(rand() * (hi - lo + 1))] as number;
    let lt = lo;
    let gt = hi;
    let i = lo;
    while (i <= gt) {
      const v = a[i] as number;
      if (v < pivot) {
        a[i] = a[lt] as number;
        a[lt] = v;
        lt++;
        i++;
      } else if (v > pivot) {
        a[i] = a[gt] as number;
        a[gt] = v;
        gt--;
      } else {
        i++;
      }
    }
    // a[lo..lt-1] < pivot, a[lt..gt] = pivot, a[gt+1..hi] > pivot
    if (k < lt) hi = lt - 1;
    else if (k > gt) lo = gt + 1;
    else return;
  }
}

/** k-th smallest (0-based) of a, reordering a in place. */
function kth(a: Float64Array, k: number, rand: () => number): number {
  selectInPlace(a, k, rand);
  return a[k] as number;
}

/**
 * Value at a 0-based, possibly fractional position of the sorted order (linear interpolation,
 * clamped to the ends), found by selection rather than a full sort.
 */
function atPosition(a: Float64Array, pos: number, rand: () => number): number {
  const idx = Math.min(Math.max(pos, 0), a.length - 1);
  const lo = Math.floor(idx);
  const frac = idx - lo;
  const v = kth(a, lo, rand);
  if (frac === 0 || lo + 1 >= a.length) return v;
  // After selecting lo, everything right of lo is ≥ a[lo]; the next order statistic is their min.
  let next = Infinity;
  for (let i = lo + 1; i < a.length; i++) {
    const w = a[i] as number;
    if (w < next) next = w;
  }
  return v + frac * (next - v);
}

/**
 * Theil–Sen slope of y on x with Sen's (1968) confidence interval as set out by Gilbert (1987):
 * C = z_{1−α/2}·√Var(S) with Var(S) the Mann–Kendall variance of y (tie-corrected),
 * M1 = (N′ − C)/2, M2 = (N′ + C)/2; the limits are the M1-th and (M2 + 1)-th of the N′ ordered
 * pairwise slopes (interpolated when the ranks are fractional). Pairs with equal x are skipped.
 */
export function theilSen(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  alpha = 0.05,
  opts: TheilSenOptions = {},
): TheilSenResult {
  const n = x.length;
  if (y.length !== n) {
    throw new RangeError(`theilSen: x and y must have the same length (${n} vs ${y.length})`);
  }
  if (n < 2) throw new RangeError(`theilSen: needs at least 2 points (got ${n})`);
  checkFiniteArray("theilSen x", x);
  checkFiniteArray("theilSen y", y);
  if (!Number.isFinite(alpha) || alpha <= 0 || alpha >= 1) {
    throw new RangeError(`theilSen: alpha must be strictly between 0 and 1 (got ${alpha})`);
  }
  const maxPairs = opts.maxPairs ?? 5_000_000;
  if (!Number.isInteger(maxPairs) || maxPairs < 1) {
    throw new RangeError(`theilSen: maxPairs must be a positive integer (got ${maxPairs})`);
  }

  const totalPairs = (n * (n - 1)) / 2;
  let slopes: Float64Array;
  let sampled = false;
  let distinctPairsEstimate: number;

  if (totalPairs <= maxPairs) {
    const buf = new Float64Array(totalPairs);
    let k = 0;
    for (let i = 0; i < n - 1; i++) {
      const xi = x[i] as number;
      const yi = y[i] as number;
      for (let j = i + 1; j < n; j++) {
        const dx = (x[j] as number) - xi;
        if (dx !== 0) buf[k++] = ((y[j] as number) - yi) / dx;
      }
    }
    slopes = buf.subarray(0, k);
    distinctPairsEstimate = k;
  } else {
    sampled = true;
    const rand = mulberry32(opts.seed ?? 0x5eed);
    const buf = new Float64Array(maxPairs);
    let k = 0;
    let tries = 0;
    const maxTries = maxPairs * 20;
    while (k < maxPairs && tries < maxTries) {
      tries++;
      const i = Math.floor(rand() * n);
      const j = Math.floor(rand() * n);
      if (i === j) continue;
      const dx = (x[j] as number) - (x[i] as number);
      if (dx === 0) continue;
      buf[k++] = ((y[j] as number) - (y[i] as number)) / dx;
    }
    slopes = buf.subarray(0, k);
    // Share of distinct-x pairs among the sampled i ≠ j draws estimates N′.
    distinctPairsEstimate = tries > 0 ? totalPairs * (k / tries) : 0;
  }

  if (slopes.length === 0) {
    throw new RangeError("theilSen: all x values are equal; the slope is undefined");
  }
  // Order statistics by selection (expected O(N′)) rather than sorting all N′ slopes.
  const pick = mulberry32(0x0dd5);
  const slope = atPosition(slopes, (slopes.length - 1) * 0.5, pick);

  const residuals = new Float64Array(n);
  for (let i = 0; i < n; i++) residuals[i] = (y[i] as number) - slope * (x[i] as number);
  const intercept = atPosition(residuals, (n - 1) * 0.5, pick);

  const nPrime = sampled ? distinctPairsEstimate : slopes.length;
  const c = normalQuantile(1 - alpha / 2) * Math.sqrt(Math.max(0, mkVariance(y)));
  const m1 = (nPrime - c) / 2;
  const m2 = (nPrime + c) / 2;
  // When sampling, map ranks in the full set of N′ slopes onto the sample proportionally.
  const scale = sampled && nPrime > 0 ? slopes.length / nPrime : 1;
  // Gilbert's ranks are 1-based: the M1-th and (M2 + 1)-th ordered slopes.
  const lower = atPosition(slopes, m1 * scale - 1, pick);
  const upper = atPosition(slopes, (m2 + 1) * scale - 1, pick);

  return { slope, intercept, lower, upper, n, pairs: Math.round(nPrime), alpha, sampled };
}

// ---------------------------------------------------------------------------------------------
// Seasonal Kendall
// ---------------------------------------------------------------------------------------------

export interface SeasonalPoint {
  season: number | string;
  x: number;
  y: number;
}

export interface SeasonSummary {
  season: number | string;
  n: number;
  s: number;
  varS: number;
}

export interface SeasonalKendallResult {
  s: number;
  varS: number;
  z: number;
  p: number;
  /** Seasonal Sen slope: median of all within-season pairwise slopes (units of y per unit x). */
  slope: number;
  seasons: SeasonSummary[];
}

/**
 * Seasonal Kendall test (Hirsch, Slack & Smith 1982). Within each season the points are ordered
 * by x; S and Var(S) (tie-corrected within the season) are summed over seasons; seasons with
 * fewer than 2 points contribute nothing. Pairs with equal x within a season add 0 to S and no
 * slope (the variance is not corrected for such ties; aggregate to one value per season and
 * period first, as the method assumes). Seasons are assumed independent.
 */
export function seasonalKendall(points: readonly SeasonalPoint[]): SeasonalKendallResult {
  if (points.length < 2) {
    throw new RangeError(`seasonalKendall: needs at least 2 points (got ${points.length})`);
  }
  const groups = new Map<number | string, { x: number; y: number }[]>();
  points.forEach((p, i) => {
    if (typeof p.season !== "number" && typeof p.season !== "string") {
      throw new RangeError(`seasonalKendall: point ${i} has no season`);
    }
    if (!Number.isFinite(p.x) || !Number.isFinite(p.y)) {
      throw new RangeError(`seasonalKendall: point ${i} has a non-finite x or y`);
    }
    let g = groups.get(p.season);
    if (!g) {
      g = [];
      groups.set(p.season, g);
    }
    g.push({ x: p.x, y: p.y });
  });

  let sTotal = 0;
  let var18Total = 0;
  const seasons: SeasonSummary[] = [];
  const slopeList: number[] = [];

  for (const [season, g] of groups) {
    const pts = [...g].sort((a, b) => a.x - b.x);
    const n = pts.length;
    let s = 0;
    let var18 = 0;
    if (n >= 2) {
      for (let i = 0; i < n - 1; i++) {
        const pi = pts[i] as { x: number; y: number };
        for (let j = i + 1; j < n; j++) {
          const pj = pts[j] as { x: number; y: number };
          const dx = pj.x - pi.x;
          if (dx === 0) continue;
          s += sign(pj.y - pi.y);
          slopeList.push((pj.y - pi.y) / dx);
        }
      }
      var18 = mkVariance18(pts.map((p) => p.y));
    }
    sTotal += s;
    var18Total += var18;
    seasons.push({ season, n, s, varS: var18 / 18 });
  }

  if (slopeList.length === 0) {
    throw new RangeError(
      "seasonalKendall: no season has two points with different x; the trend is undefined",
    );
  }
  const varTotal = var18Total / 18;
  const sortedSlopes = Float64Array.from(slopeList);
  sortedSlopes.sort();
  const z = zFromS(sTotal, varTotal);
  return {
    s: sTotal,
    varS: varTotal,
    z,
    p: varTotal > 0 ? twoSidedP(z) : 1,
    slope: quantileSorted(sortedSlopes, 0.5),
    seasons,
  };
}

// ---------------------------------------------------------------------------------------------
// Minimum data for a trend
// ---------------------------------------------------------------------------------------------

export interface EnoughForTrendOptions {
  /** Minimum number of distinct nights; default 30. */
  minNights?: number;
  /** Minimum span from the first to the last night, in months (30.436875 days); default 6. */
  minMonths?: number;
}

export interface EnoughForTrendResult {
  ok: boolean;
  reason: string;
  nights: number;
  spanMonths: number;
}

const DAYS_PER_MONTH = 365.2425 / 12;
const NIGHT_RE = /^(\d{4})-(\d{2})-(\d{2})$/;

function parseNight(night: string, index: number): number {
  const m = NIGHT_RE.exec(night);
  if (!m)
    throw new RangeError(`enoughForTrend: night ${index} is not a YYYY-MM-DD date (${night})`);
  const y = Number(m[1]);
  const mo = Number(m[2]);
  const d = Number(m[3]);
  const t = Date.UTC(y, mo - 1, d);
  const back = new Date(t);
  if (back.getUTCFullYear() !== y || back.getUTCMonth() !== mo - 1 || back.getUTCDate() !== d) {
    throw new RangeError(`enoughForTrend: night ${index} is not a valid calendar date (${night})`);
  }
  return t / 86_400_000;
}

/**
 * Whether a station's nightly summaries are enough for a trend: at least `minNights` distinct
 * nights (named by evening date, YYYY-MM-DD) spanning at least `minMonths` months.
 */
export function enoughForTrend(
  nights: readonly { night: string }[],
  opts: EnoughForTrendOptions = {},
): EnoughForTrendResult {
  const minNights = opts.minNights ?? 30;
  const minMonths = opts.minMonths ?? 6;
  if (!Number.isFinite(minNights) || minNights < 0) {
    throw new RangeError(
      `enoughForTrend: minNights must be a non-negative number (got ${minNights})`,
    );
  }
  if (!Number.isFinite(minMonths) || minMonths < 0) {
    throw new RangeError(
      `enoughForTrend: minMonths must be a non-negative number (got ${minMonths})`,
    );
  }
  const days = new Set<number>();
  nights.forEach((n, i) => days.add(parseNight(n.night, i)));
  const count = days.size;
  let spanMonths = 0;
  if (count > 0) {
    let first = Infinity;
    let last = -Infinity;
    for (const d of days) {
      if (d < first) first = d;
      if (d > last) last = d;
    }
    spanMonths = (last - first) / DAYS_PER_MONTH;
  }
  const spanText = spanMonths.toFixed(1);
  const problems: string[] = [];
  if (count < minNights) problems.push(`${count} of the ${minNights} nights needed`);
  if (spanMonths < minMonths) {
    problems.push(`a span of ${spanText} of the ${minMonths} months needed`);
  }
  if (problems.length > 0) {
    return {
      ok: false,
      reason: `Not enough data for a trend: ${problems.join(" and ")}.`,
      nights: count,
      spanMonths,
    };
  }
  return {
    ok: true,
    reason: `${count} nights over ${spanText} months (minimum ${minNights} nights over ${minMonths} months).`,
    nights: count,
    spanMonths,
  };
}
