/**
 * Cloud screening for one station-night.
 *
 * Measure (chosen here): the RANGE (max − min) of the values in a time window centred on each
 * reading, [t − W/2, t + W/2] with W = cloudWindowMin. A reading is cloud-suspect when that range
 * exceeds cloudSpreadMag. Clouds drifting over a site make zenith readings jump by tenths of a
 * magnitude within minutes, while a clear astronomical night changes by a few hundredths over the same
 * time; thresholds are site- and instrument-specific (Hänel et al. 2018, JQSRT 205:278), hence
 * settings per site (db/schema/sites.ts: cloud_window_min 15, cloud_spread_mag 0.25 by default).
 * The range was preferred over a robust scatter of consecutive differences because it also catches a
 * single step (a cloud bank arriving) and is simple to explain to a volunteer; its weakness, a steady
 * trend (twilight, moonrise), is avoided by screening only readings the sun/moon/range tests kept
 * (ingest/summarise.ts passes just those).
 *
 * Only readings with at least one other reading in their window can be judged; a lone reading is
 * never flagged. O(n): two pointers and monotonic deques for the window max and min.
 */

export type CloudOptions = { cloudWindowMin: number; cloudSpreadMag: number };

/**
 * `timesMs` must be sorted ascending (ties allowed); `mags` the matching values.
 * Returns, per reading, whether it is cloud-suspect.
 */
export function cloudSuspects(
  timesMs: ArrayLike<number>,
  mags: ArrayLike<number>,
  options: CloudOptions,
): boolean[] {
  const limit = options.cloudSpreadMag;
  // NaN (no neighbour) compares false: a lone reading is never flagged.
  return windowSpreads(timesMs, mags, options.cloudWindowMin).map((spread) => spread > limit);
}

/** The window range (max − min) per reading, NaN where the window holds no other reading; O(n). */
export function windowSpreads(
  timesMs: ArrayLike<number>,
  mags: ArrayLike<number>,
  cloudWindowMin: number,
): number[] {
  const n = timesMs.length;
  if (mags.length !== n) throw new Error("timesMs and mags differ in length");
  const half = (cloudWindowMin * 60_000) / 2;
  const out: number[] = new Array<number>(n).fill(Number.NaN);
  // Deques of indices (typed arrays with head/tail pointers); every index enters and leaves once.
  const maxQ = new Int32Array(n);
  const minQ = new Int32Array(n);
  let maxH = 0,
    maxT = 0,
    minH = 0,
    minT = 0,
    lo = 0,
    hi = 0;
  for (let i = 0; i < n; i++) {
    const t = timesMs[i]!;
    if (i > 0 && t < timesMs[i - 1]!) throw new Error("timesMs must be sorted ascending");
    while (hi < n && timesMs[hi]! <= t + half) {
      const v = mags[hi]!;
      while (maxT > maxH && mags[maxQ[maxT - 1]!]! <= v) maxT--;
      maxQ[maxT++] = hi;
      while (minT > minH && mags[minQ[minT - 1]!]! >= v) minT--;
      minQ[minT++] = hi;
      hi++;
    }
    while (timesMs[lo]! < t - half) lo++;
    while (maxQ[maxH]! < lo) maxH++;
    while (minQ[minH]! < lo) minH++;
    if (hi - lo >= 2) out[i] = mags[maxQ[maxH]!]! - mags[minQ[minH]!]!;
  }
  return out;
}
