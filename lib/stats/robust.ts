/**
 * Robust summary statistics. Pure functions; inputs are never mutated.
 * All functions throw RangeError for empty input or non-finite values.
 */

/** Scale factor that makes the MAD a consistent estimator of σ for normal data (common practice). */
export const MAD_NORMAL_CONSISTENCY = 1.4826;

function checkValues(name: string, values: ArrayLike<number>): void {
  if (values.length === 0) throw new RangeError(`${name}: needs at least one value`);
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (typeof v !== "number" || !Number.isFinite(v)) {
      throw new RangeError(`${name}: value at index ${i} is not a finite number (${String(v)})`);
    }
  }
}

function sortedCopy(values: ArrayLike<number>): Float64Array {
  const a = Float64Array.from(values as ArrayLike<number>);
  a.sort();
  return a;
}

/** Type-7 quantile (linear interpolation, R's default) of an already sorted array. */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  if (sorted.length === 0) throw new RangeError("quantileSorted: needs at least one value");
  if (!Number.isFinite(p) || p < 0 || p > 1) {
    throw new RangeError(`quantile: p must be in [0, 1] (got ${p})`);
  }
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, sorted.length - 1);
  const a = sorted[lo] as number;
  const b = sorted[hi] as number;
  return a + (h - lo) * (b - a);
}

/** Median (mean of the two middle values for an even count). */
export function median(values: ArrayLike<number>): number {
  checkValues("median", values);
  return quantileSorted(sortedCopy(values), 0.5);
}

/** Type-7 quantile (Hyndman & Fan 1996 definition 7; R's and NumPy's default). */
export function quantile(values: ArrayLike<number>, p: number): number {
  checkValues("quantile", values);
  return quantileSorted(sortedCopy(values), p);
}

/** Interquartile range, Q3 − Q1 with type-7 quantiles. */
export function iqr(values: ArrayLike<number>): number {
  checkValues("iqr", values);
  const s = sortedCopy(values);
  return quantileSorted(s, 0.75) - quantileSorted(s, 0.25);
}

/**
 * Median absolute deviation from the median. Raw by default (scale = 1); pass
 * MAD_NORMAL_CONSISTENCY to estimate σ for normally distributed data.
 */
export function mad(values: ArrayLike<number>, scale = 1): number {
  checkValues("mad", values);
  if (!Number.isFinite(scale) || scale <= 0) {
    throw new RangeError(`mad: scale must be a positive finite number (got ${scale})`);
  }
  const m = median(values);
  const dev = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) dev[i] = Math.abs((values[i] as number) - m);
  dev.sort();
  return scale * quantileSorted(dev, 0.5);
}

export interface RunningMedianOptions {
  /**
   * "center": window centred on each point (odd windows are symmetric; even windows take one
   * more point before than after). "trailing": the point and the (window − 1) before it.
   */
  align?: "center" | "trailing";
}

/**
 * Running median over a window of `windowSize` points; returns an array of the same length.
 * At the ends the window is truncated to the points that exist (no padding).
 */
export function runningMedian(
  values: ArrayLike<number>,
  windowSize: number,
  opts: RunningMedianOptions = {},
): number[] {
  if (values.length === 0) return [];
  checkValues("runningMedian", values);
  if (!Number.isInteger(windowSize) || windowSize < 1) {
    throw new RangeError(
      `runningMedian: windowSize must be a positive integer (got ${windowSize})`,
    );
  }
  const align = opts.align ?? "center";
  const n = values.length;
  const before = align === "trailing" ? windowSize - 1 : Math.floor(windowSize / 2);
  const after = align === "trailing" ? 0 : windowSize - 1 - before;

  // Sorted window maintained by binary insertion/removal: O(n·w), fine for screening windows.
  const win: number[] = [];
  const insert = (v: number) => {
    let lo = 0;
    let hi = win.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if ((win[mid] as number) < v) lo = mid + 1;
      else hi = mid;
    }
    win.splice(lo, 0, v);
  };
  const remove = (v: number) => {
    let lo = 0;
    let hi = win.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if ((win[mid] as number) < v) lo = mid + 1;
      else hi = mid;
    }
    win.splice(lo, 1);
  };

  const out = new Array<number>(n);
  let winStart = 0; // first index currently in the window
  let winEnd = -1; // last index currently in the window
  for (let i = 0; i < n; i++) {
    const start = Math.max(0, i - before);
    const end = Math.min(n - 1, i + after);
    while (winEnd < end) {
      winEnd++;
      insert(values[winEnd] as number);
    }
    while (winStart < start) {
      remove(values[winStart] as number);
      winStart++;
    }
    out[i] = quantileSorted(win, 0.5);
  }
  return out;
}
