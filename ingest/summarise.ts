/**
 * One station-night's summary (db/schema/readings.ts: night_summaries). Pure.
 *
 * Definitions (all on CALIBRATED values, raw + calibration offset; raw values are never altered):
 * - Screening: readings carrying sunAltDeg and moonAltDeg are re-screened with the given thresholds
 *   (so a site can change its thresholds without recomputing positions); otherwise their stored flags
 *   are kept. The cloud flag is always recomputed here, since it needs the whole night: it is judged
 *   only among readings that passed every other test (see ingest/screening/cloud.ts).
 * - usable: flag mask 0 after that.
 * - medianMag: median of usable values (mean of the two middle values for an even count).
 * - spreadMag: interquartile range Q3 − Q1 of usable values, quartiles by linear interpolation
 *   between order statistics (position (n − 1)·p, 0-based; "type 7", the default of R and NumPy).
 *   A single usable reading has spread 0.
 * - cadence: cadenceHintMin when given, else the median of the positive intervals between
 *   consecutive readings of the night (all readings, any flag).
 * - darkestSustainedMag: the highest (darkest) median over 30-minute windows [t, t + 30 min) that
 *   start at a usable reading and contain usable readings only; a window counts when it holds at
 *   least half the readings the cadence implies (≥ 0.5 · 30 / cadence, at least 2). Null when no
 *   window qualifies (e.g. under a quarter of an hour of usable data).
 * - usableHours: each usable reading stands for min(cadence, time to the next reading of the night)
 *   (the last reading for one cadence), so gaps and bursts do not inflate it; summed, in hours.
 * - Empty nights and nights with no usable reading: medianMag, darkestSustainedMag, spreadMag null,
 *   usableHours 0; firstAt/lastAt null only when there are no readings at all.
 */
import { CLOUD_SUSPECT, DAYLIGHT, MOONLIT, OUT_OF_RANGE, TWILIGHT } from "../lib/flags";
import { cloudSuspects } from "./screening/cloud";
import { screenReading } from "./screening/screen";
import { quantileSorted } from "../lib/stats/robust";

export type SummaryReading = {
  takenAt: Date;
  mag: number;
  flags: number;
  sunAltDeg?: number;
  moonAltDeg?: number;
};

export type SummaryOptions = {
  calibrationOffsetMag: number;
  cloudWindowMin: number;
  cloudSpreadMag: number;
  sunMaxAltDeg: number;
  moonMaxAltDeg: number;
  /** The station's nominal sampling interval (minutes), when known. */
  cadenceHintMin?: number;
  /** Length of the darkest-sustained window (minutes, default 30). */
  sustainedWindowMin?: number;
};

export type FlagCounts = {
  daylight: number;
  twilight: number;
  moonlit: number;
  cloudSuspect: number;
  outOfRange: number;
  usable: number;
};

export type NightSummary = {
  readings: number;
  usableReadings: number;
  medianMag: number | null;
  darkestSustainedMag: number | null;
  spreadMag: number | null;
  usableHours: number;
  calibrationOffsetMag: number;
  flagCounts: FlagCounts;
  firstAt: Date | null;
  lastAt: Date | null;
  /** Per reading, in input order: the flag mask after re-screening and the cloud test. */
  cloudFlags: number[];
  /** The cadence used (minutes), null when it could not be determined. */
  cadenceMin: number | null;
};

const MINUTE_MS = 60_000;

/** Median of a sorted, non-empty array (mean of the middle pair for even length). */
export const sortedMedian = (sorted: ArrayLike<number>): number => quantileSorted(sorted, 0.5);

/** Quantile of a sorted, non-empty array by linear interpolation at (n − 1)·p ("type 7"). */
export const sortedQuantile = quantileSorted;

function lowerBound(arr: number[], v: number): number {
  let lo = 0;
  let hi = arr.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (arr[mid]! < v) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * Highest median over windows [t_i, t_i + windowMs) starting at each value, counting only windows
 * with at least `minCount` values. times sorted ascending. O(n·w) with a sorted sliding window.
 */
export function darkestRunningMedian(
  timesMs: ArrayLike<number>,
  values: ArrayLike<number>,
  windowMs: number,
  minCount: number,
): number | null {
  const n = timesMs.length;
  const window: number[] = [];
  let best: number | null = null;
  let hi = 0;
  for (let i = 0; i < n; i++) {
    if (i > 0) window.splice(lowerBound(window, values[i - 1]!), 1);
    const end = timesMs[i]! + windowMs;
    while (hi < n && timesMs[hi]! < end) {
      const v = values[hi]!;
      window.splice(lowerBound(window, v), 0, v);
      hi++;
    }
    if (window.length >= minCount) {
      const m = sortedMedian(window);
      if (best === null || m > best) best = m;
    }
  }
  return best;
}

export function summariseNight(
  readings: readonly SummaryReading[],
  options: SummaryOptions,
): NightSummary {
  const n = readings.length;
  const offset = options.calibrationOffsetMag;
  const flagCounts: FlagCounts = {
    daylight: 0,
    twilight: 0,
    moonlit: 0,
    cloudSuspect: 0,
    outOfRange: 0,
    usable: 0,
  };
  const empty: NightSummary = {
    readings: n,
    usableReadings: 0,
    medianMag: null,
    darkestSustainedMag: null,
    spreadMag: null,
    usableHours: 0,
    calibrationOffsetMag: offset,
    flagCounts,
    firstAt: null,
    lastAt: null,
    cloudFlags: [],
    cadenceMin: options.cadenceHintMin ?? null,
  };
  if (n === 0) return empty;

  // Time order (stable for ties).
  const order = Array.from({ length: n }, (_, i) => i);
  order.sort((a, b) => readings[a]!.takenAt.getTime() - readings[b]!.takenAt.getTime() || a - b);
  const times = new Float64Array(n);
  for (let k = 0; k < n; k++) times[k] = readings[order[k]!]!.takenAt.getTime();

  // 1. sun/moon/range flags (re-screened where positions are known), cloud bit cleared.
  const masks = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    const r = readings[i]!;
    masks[i] =
      r.sunAltDeg !== undefined && r.moonAltDeg !== undefined
        ? screenReading(
            { mag: r.mag, sunAltDeg: r.sunAltDeg, moonAltDeg: r.moonAltDeg },
            { sunMaxAltDeg: options.sunMaxAltDeg, moonMaxAltDeg: options.moonMaxAltDeg },
          )
        : r.flags & ~CLOUD_SUSPECT;
  }

  // 2. cloud test among the otherwise usable readings, in time order.
  const candTimes: number[] = [];
  const candMags: number[] = [];
  const candIdx: number[] = [];
  for (let k = 0; k < n; k++) {
    const i = order[k]!;
    if (masks[i] === 0) {
      candTimes.push(times[k]!);
      candMags.push(readings[i]!.mag + offset);
      candIdx.push(i);
    }
  }
  const cloudy = cloudSuspects(candTimes, candMags, {
    cloudWindowMin: options.cloudWindowMin,
    cloudSpreadMag: options.cloudSpreadMag,
  });
  for (let j = 0; j < cloudy.length; j++) if (cloudy[j]) masks[candIdx[j]!]! |= CLOUD_SUSPECT;

  // 3. counts
  for (let i = 0; i < n; i++) {
    const m = masks[i]!;
    if (m & DAYLIGHT) flagCounts.daylight++;
    if (m & TWILIGHT) flagCounts.twilight++;
    if (m & MOONLIT) flagCounts.moonlit++;
    if (m & CLOUD_SUSPECT) flagCounts.cloudSuspect++;
    if (m & OUT_OF_RANGE) flagCounts.outOfRange++;
    if (m === 0) flagCounts.usable++;
  }

  // 4. cadence
  let cadenceMin: number | null = options.cadenceHintMin ?? null;
  if (cadenceMin === null) {
    const gaps: number[] = [];
    for (let k = 1; k < n; k++) {
      const g = times[k]! - times[k - 1]!;
      if (g > 0) gaps.push(g);
    }
    if (gaps.length > 0) {
      gaps.sort((a, b) => a - b);
      cadenceMin = sortedMedian(gaps) / MINUTE_MS;
    }
  }

  // 5. usable values (time order) and statistics
  const uTimes: number[] = [];
  const uVals: number[] = [];
  let usableMs = 0;
  const cadenceMs = cadenceMin === null ? 0 : cadenceMin * MINUTE_MS;
  for (let k = 0; k < n; k++) {
    const i = order[k]!;
    if (masks[i] !== 0) continue;
    uTimes.push(times[k]!);
    uVals.push(readings[i]!.mag + offset);
    const toNext = k + 1 < n ? times[k + 1]! - times[k]! : cadenceMs;
    usableMs += Math.min(cadenceMs, toNext);
  }

  const base: NightSummary = {
    ...empty,
    usableReadings: uVals.length,
    flagCounts,
    firstAt: new Date(times[0]!),
    lastAt: new Date(times[n - 1]!),
    cloudFlags: masks,
    cadenceMin,
    usableHours: usableMs / 3_600_000,
  };
  if (uVals.length === 0) return base;

  const sorted = [...uVals].sort((a, b) => a - b);
  const windowMin = options.sustainedWindowMin ?? 30;
  let darkest: number | null = null;
  if (cadenceMin !== null && cadenceMin > 0) {
    const minCount = Math.max(2, Math.ceil((0.5 * windowMin) / cadenceMin - 1e-9));
    darkest = darkestRunningMedian(uTimes, uVals, windowMin * MINUTE_MS, minCount);
  }
  return {
    ...base,
    medianMag: sortedMedian(sorted),
    spreadMag: sortedQuantile(sorted, 0.75) - sortedQuantile(sorted, 0.25),
    darkestSustainedMag: darkest,
  };
}

/**
 * The calibration offset in force on a night: the entry with the latest effectiveFrom on or before
 * the night (dates compare as YYYY-MM-DD strings). 0 when none applies yet.
 */
export function calibrationOffsetAt(
  calibrations: ReadonlyArray<{ effectiveFrom: string; offsetMag: number }>,
  night: string,
): number {
  let best: { effectiveFrom: string; offsetMag: number } | null = null;
  for (const c of calibrations) {
    if (c.effectiveFrom <= night && (best === null || c.effectiveFrom > best.effectiveFrom))
      best = c;
  }
  return best === null ? 0 : best.offsetMag;
}
