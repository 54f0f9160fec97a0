/**
 * Sun and Moon positions for screening readings: the fast path.
 *
 * What is stored and compared is the GEOMETRIC altitude (no atmospheric refraction): twilight is
 * defined on the geometric altitude of the Sun's centre (Explanatory Supplement). For the Moon it is
 * the topocentric geometric altitude (parallax applied, refraction not), which is what an observer's
 * horizon sees before the air bends the light.
 *
 * How it is obtained from suncalc 2.0.2 (read in node_modules/suncalc/index.js):
 * - suncalc only exposes apparent altitudes: `altitude = h + R(h)` with
 *   `R(h) = 0.0002967 / tan(h + 0.00312536 / (h + 0.08901179))` rad (Meeus 16.4) and h clamped to 0
 *   below the horizon (so every negative altitude is lifted by the constant R(0) = 0.484°).
 *   `removeSuncalcRefraction` inverts that exactly: below R(0) by subtraction, above it by Newton's
 *   method to machine precision.
 * - The equatorial coordinates and sidereal time are internal. But suncalc's horizon step is
 *   `H = θ₀(d) + λ − α`, `alt = asin(sin φ sin δ + cos φ cos δ cos H)`,
 *   `az = atan2(sin H, cos H sin φ − tan δ cos φ) + 180°`. At the north pole (φ = 90°) this gives
 *   `alt = δ` and `az = H₀ + 180°` with `H₀ = θ₀ − α` the Greenwich hour angle. So one suncalc call at
 *   (90°, 0°) per body per time yields δ and H₀ exactly (the Moon also needs its parallax undone:
 *   `h = h_geo − asin(ρ/Δ · cos h_geo)` with ρ = 6378.14 km, suncalc's constant, Δ its distance).
 * - Those depend on time only. A cache keeps them per knot (every UTC minute by default) and shares
 *   them across every station; per reading only the horizon step at the station's latitude and
 *   longitude remains (H = H₀ + λ).
 * - A reading exactly on a knot uses the knot. Between knots, δ, H₀, ρ/Δ and the illuminated fraction
 *   are interpolated linearly (H₀ unwrapped). Over one minute the error of that is ~1e-8° (the
 *   equatorial coordinates are smooth and sidereal time is linear in suncalc), far inside the 1e-6°
 *   promised (tests/unit/sky-positions.test.ts checks it with random times and places). The one
 *   non-smooth input is suncalc's piecewise ΔT polynomial, which jumps by ~0.05 s at its segment
 *   boundaries (years 2005.0 and 2050.0 counted as 2000 + d/365.2425): a reading in a knot interval
 *   touching one (±1 ms) is computed exactly instead of interpolated.
 *
 * Cost: suncalc does the Meeus series work per call; with the cache that happens once per minute for
 * the whole network instead of once per reading (see scripts/bench/screening.ts).
 */
import * as SunCalc from "suncalc";
import { screenReading, type ScreenThresholds } from "./screen";

const RAD = Math.PI / 180;
const DEG = 180 / Math.PI;
const TWO_PI = 2 * Math.PI;
const MINUTE_MS = 60_000;
const DAY_MS = 86_400_000;

/** suncalc 2's Earth radius for the Moon's topocentric parallax (km). */
const SUNCALC_EARTH_RADIUS_KM = 6378.14;

// ---------------------------------------------------------------------------------------------
// suncalc's refraction and its inverse

/** suncalc 2's refraction term (radians) for a geometric altitude h (radians), clamped at h = 0. */
export function suncalcRefractionRad(hRad: number): number {
  const h = hRad < 0 ? 0 : hRad;
  return 0.0002967 / Math.tan(h + 0.00312536 / (h + 0.08901179));
}

const R0 = suncalcRefractionRad(0); // 0.008446 rad = 0.4839°

/** Geometric altitude (radians) from suncalc's apparent altitude (radians), exact inverse. */
function unrefractRad(a: number): number {
  if (a <= R0) return a - R0;
  // g(h) = h + R(h) − a is increasing on h ≥ 0 (1 + R'(h) ≥ 0.85), g(0) < 0: Newton from h = a − R(a).
  let h = a - suncalcRefractionRad(a);
  if (h < 0) h = 0;
  for (let i = 0; i < 40; i++) {
    const q = h + 0.08901179;
    const x = h + 0.00312536 / q;
    const t = Math.tan(x);
    const r = 0.0002967 / t;
    const s = Math.sin(x);
    const dr = (-0.0002967 / (s * s)) * (1 - 0.00312536 / (q * q));
    const step = (h + r - a) / (1 + dr);
    h -= step;
    if (h < 0) h = 0;
    if (Math.abs(step) < 1e-16) break;
  }
  return h;
}

/** Geometric altitude in degrees from an apparent altitude returned by suncalc 2 (degrees). */
export function removeSuncalcRefraction(apparentDeg: number): number {
  return unrefractRad(apparentDeg * RAD) * DEG;
}

/** Geocentric altitude from suncalc's topocentric one: solve h_geo − asin(k cos h_geo) = h. */
function undoParallaxRad(h: number, k: number): number {
  let g = h + k * Math.cos(h);
  for (let i = 0; i < 30; i++) {
    const c = Math.cos(g);
    const f = g - Math.asin(k * c) - h;
    const df = 1 + (k * Math.sin(g)) / Math.sqrt(1 - k * k * c * c);
    const step = f / df;
    g -= step;
    if (Math.abs(step) < 1e-16) break;
  }
  return g;
}

function wrapPi(a: number): number {
  return a - TWO_PI * Math.round(a / TWO_PI);
}

// ---------------------------------------------------------------------------------------------
// The reference (naive) computation: one suncalc call per body per reading

export type SkyPosition = {
  /** Geometric (unrefracted) altitude of the Sun's centre, degrees. */
  sunAltDeg: number;
  /** Topocentric geometric (unrefracted) altitude of the Moon's centre, degrees. */
  moonAltDeg: number;
  /** Moon's illuminated fraction, 0 (new) to 1 (full), geocentric. */
  moonFraction: number;
};

/** Per-reading computation straight from suncalc, refraction removed. The reference for the cache. */
export function naiveSkyAt(date: Date, latDeg: number, lonDeg: number): SkyPosition {
  const sun = SunCalc.getPosition(date, latDeg, lonDeg);
  const moon = SunCalc.getMoonPosition(date, latDeg, lonDeg);
  const ill = SunCalc.getMoonIllumination(date);
  return {
    sunAltDeg: removeSuncalcRefraction(sun.altitude),
    moonAltDeg: removeSuncalcRefraction(moon.altitude),
    moonFraction: ill.fraction,
  };
}

// ---------------------------------------------------------------------------------------------
// Time-only quantities (knots) and the cache

/** Everything about the Sun and Moon that depends on time only. Angles in radians. */
export type SkyKnot = {
  ms: number;
  sunDec: number;
  sinSunDec: number;
  cosSunDec: number;
  /** Greenwich hour angle of the Sun, θ₀ − α. */
  sunGha: number;
  moonDec: number;
  sinMoonDec: number;
  cosMoonDec: number;
  moonGha: number;
  /** Earth radius over Moon distance (sine of the horizontal parallax). */
  moonK: number;
  moonFraction: number;
};

/** Computes the time-only quantities from suncalc (two positions at the pole and the illumination). */
export function computeKnot(ms: number): SkyKnot {
  const date = new Date(ms);
  const sp = SunCalc.getPosition(date, 90, 0);
  const mp = SunCalc.getMoonPosition(date, 90, 0);
  const ill = SunCalc.getMoonIllumination(date);
  const sunDec = unrefractRad(sp.altitude * RAD);
  const moonK = SUNCALC_EARTH_RADIUS_KM / mp.distance;
  const moonDec = undoParallaxRad(unrefractRad(mp.altitude * RAD), moonK);
  return {
    ms,
    sunDec,
    sinSunDec: Math.sin(sunDec),
    cosSunDec: Math.cos(sunDec),
    sunGha: wrapPi((sp.azimuth - 180) * RAD),
    moonDec,
    sinMoonDec: Math.sin(moonDec),
    cosMoonDec: Math.cos(moonDec),
    moonGha: wrapPi((mp.azimuth - 180) * RAD),
    moonK,
    moonFraction: ill.fraction,
  };
}

/** Instants (ms) where suncalc's ΔT polynomial changes segment (2000 + d/365.2425 = year). */
const DELTA_T_BREAKS_MS = [1920, 1941, 1961, 1986, 2005, 2050].map(
  (y) => ((y - 2000) * 365.2425 + 0.5 + 2451545 - 2440588) * DAY_MS,
);

export type SkyCache = {
  readonly stepMs: number;
  readonly maxKnots: number;
  readonly knots: Map<number, SkyKnot>;
  /** Counters, for tests and benchmarks. */
  stats: { knotsComputed: number; exact: number };
  last: SkyKnot | null;
};

export type SkyCacheOptions = {
  /** Knot spacing in minutes (default 1). Coarser knots trade a little accuracy for speed. */
  stepMin?: number;
  /** Most knots kept; the oldest are dropped beyond this (default 200,000 ≈ 4.6 months of minutes). */
  maxKnots?: number;
};

export function createSkyCache(options: SkyCacheOptions = {}): SkyCache {
  const stepMin = options.stepMin ?? 1;
  if (!(stepMin > 0)) throw new Error("stepMin must be positive");
  return {
    stepMs: stepMin * MINUTE_MS,
    maxKnots: options.maxKnots ?? 200_000,
    knots: new Map(),
    stats: { knotsComputed: 0, exact: 0 },
    last: null,
  };
}

function knotAt(cache: SkyCache, index: number): SkyKnot {
  const last = cache.last;
  const ms = index * cache.stepMs;
  if (last !== null && last.ms === ms) return last;
  let k = cache.knots.get(index);
  if (k === undefined) {
    k = computeKnot(ms);
    cache.stats.knotsComputed++;
    if (cache.knots.size >= cache.maxKnots) {
      // Drop the oldest tenth (Map keeps insertion order).
      let drop = Math.max(1, Math.floor(cache.maxKnots / 10));
      for (const key of cache.knots.keys()) {
        cache.knots.delete(key);
        if (--drop === 0) break;
      }
    }
    cache.knots.set(index, k);
  }
  cache.last = k;
  return k;
}

/** A knot for an arbitrary instant: exact on knot times, interpolated between them. */
function timeKnot(cache: SkyCache, ms: number): SkyKnot {
  const step = cache.stepMs;
  const i0 = Math.floor(ms / step);
  const t0 = i0 * step;
  if (t0 === ms) return knotAt(cache, i0);
  const t1 = t0 + step;
  for (const b of DELTA_T_BREAKS_MS) {
    // ±1 ms margin: suncalc's own Julian-day rounding (~40 µs) blurs where it switches segment.
    if (b > t0 - 1 && b <= t1 + 1) {
      cache.stats.exact++;
      return computeKnot(ms);
    }
  }
  const a = knotAt(cache, i0);
  const b = knotAt(cache, i0 + 1);
  const u = (ms - t0) / step;
  const sunDec = a.sunDec + u * (b.sunDec - a.sunDec);
  const moonDec = a.moonDec + u * (b.moonDec - a.moonDec);
  return {
    ms,
    sunDec,
    sinSunDec: Math.sin(sunDec),
    cosSunDec: Math.cos(sunDec),
    sunGha: a.sunGha + u * wrapPi(b.sunGha - a.sunGha),
    moonDec,
    sinMoonDec: Math.sin(moonDec),
    cosMoonDec: Math.cos(moonDec),
    moonGha: a.moonGha + u * wrapPi(b.moonGha - a.moonGha),
    moonK: a.moonK + u * (b.moonK - a.moonK),
    moonFraction: a.moonFraction + u * (b.moonFraction - a.moonFraction),
  };
}

/** The horizon step: altitudes (degrees) at a place from the time-only quantities. */
function horizon(k: SkyKnot, sinLat: number, cosLat: number, lonRad: number): SkyPosition {
  const sunAlt = Math.asin(
    sinLat * k.sinSunDec + cosLat * k.cosSunDec * Math.cos(k.sunGha + lonRad),
  );
  const moonGeo = Math.asin(
    sinLat * k.sinMoonDec + cosLat * k.cosMoonDec * Math.cos(k.moonGha + lonRad),
  );
  const moonAlt = moonGeo - Math.asin(k.moonK * Math.cos(moonGeo));
  return { sunAltDeg: sunAlt * DEG, moonAltDeg: moonAlt * DEG, moonFraction: k.moonFraction };
}

/** Geometric Sun and Moon altitudes and the Moon's illuminated fraction at a place and time. */
export function skyAt(cache: SkyCache, date: Date, latDeg: number, lonDeg: number): SkyPosition {
  const k = timeKnot(cache, date.getTime());
  const phi = latDeg * RAD;
  return horizon(k, Math.sin(phi), Math.cos(phi), lonDeg * RAD);
}

export type ScreenInput = { takenAt: Date; mag: number };
export type ScreenedReading = SkyPosition & { flags: number };

/**
 * Screens one station's readings: positions from the shared cache plus the sun/moon/range flags
 * (the cloud flag needs the whole night; see ingest/summarise.ts). Output is in input order.
 */
export function screenBatch(
  cache: SkyCache,
  station: { latDeg: number; lonDeg: number },
  readings: readonly ScreenInput[],
  thresholds: Partial<ScreenThresholds> = {},
): ScreenedReading[] {
  const phi = station.latDeg * RAD;
  const sinLat = Math.sin(phi);
  const cosLat = Math.cos(phi);
  const lonRad = station.lonDeg * RAD;
  const out: ScreenedReading[] = new Array(readings.length);
  for (let i = 0; i < readings.length; i++) {
    const r = readings[i]!;
    const pos = horizon(timeKnot(cache, r.takenAt.getTime()), sinLat, cosLat, lonRad);
    out[i] = {
      sunAltDeg: pos.sunAltDeg,
      moonAltDeg: pos.moonAltDeg,
      moonFraction: pos.moonFraction,
      flags: screenReading(
        { mag: r.mag, sunAltDeg: pos.sunAltDeg, moonAltDeg: pos.moonAltDeg },
        thresholds,
      ),
    };
  }
  return out;
}
