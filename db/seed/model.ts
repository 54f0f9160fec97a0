/**
 * The seeded model behind the demo scenario's invented readings. A MODEL, not a measurement: it
 * gives the demo plausible nights (dusk to dawn, moon, clouds, slow trends) that the screening and
 * summaries can be shown on. Pure and deterministic: the same options give the same readings
 * (mulberry32 PRNG seeded from the station seed and the night; no Math.random).
 *
 * Zenith brightness is built in linear units (relative flux F = 10^(−0.4·m)), so components and
 * trends compose: total = natural·(1 − 0.25·c) + artificial·(1 + 2·c) + twilight + moon·(1 + c),
 * c ∈ [0, 1] the cloud cover; then m = −2.5·log₁₀(total) plus measurement noise.
 * - Natural sky: 21.8 mag/arcsec² (or baseMag when darker), with an airglow drift over the ~11-year
 *   solar cycle, a sinusoid of amplitude 0.15 mag, darkest at solar minimum (taken as 2019.9);
 *   airglow follows solar activity (Krisciunas 1997, PASP 109:1181). Plus a per-night offset
 *   (σ 0.03 mag; even pristine skies vary by ~0.1 mag over months) and per-reading noise σ 0.025 mag
 *   (±0.05 at 2σ).
 * - Artificial light: the flux that makes a clear, moonless, airglow-neutral night equal
 *   baseMag + brighteningMagPerYear·(years since startDate) + step.deltaMag (from step.fromNight),
 *   i.e. F(target) − F(natural), never negative. A dark site (baseMag = 21.8) starts with none.
 * - Twilight: m_tw = 25.0 − 1.1·(h + 18) mag/arcsec² for the Sun's geometric altitude h (11.8 at
 *   −6°, 18.4 at −12°, 25.0 at −18°, fading on below): a straight line in magnitude, i.e. flux
 *   falling exponentially with the Sun's depression. Readings exist only while h < −6°.
 * - Moon: above the horizon, flux F(18.0)·f³·√(sin a) with f the illuminated fraction and a its
 *   altitude: 18.0 mag/arcsec² from the Moon alone at full moon in the zenith (~17.96 in total), about
 *   2.3 mag fainter at quarter.
 * - Clouds: a night is cloudy with probability cloudyNightFraction (0.3). A cloudy night has 1–4
 *   patches (30–180 min, opacity 0.4–1, 10-minute edges); inside them the cover flickers from reading
 *   to reading (AR(1)) and the noise grows (σ + 0.08·c), so readings are jumpy. Clouds dim the natural
 *   sky a little (a dark site gets slightly darker) and reflect artificial light back down (a lit
 *   site gets brighter).
 * - Temperature: seasonal mean by latitude plus a daily cosine peaking at 15:00 local solar time.
 * Positions come from ingest/screening/sky-positions.ts (geometric altitudes, 10-minute knots).
 */
import { createSkyCache, skyAt, type SkyCache } from "../../ingest/screening/sky-positions";
import { addDays, nightBounds } from "../../ingest/night";

export const NATURAL_SKY_MAG = 21.8;
export const AIRGLOW_AMPLITUDE_MAG = 0.15;
export const SOLAR_CYCLE_YEARS = 11;
/** Taken as the last solar minimum, decimal year (Dec 2019). */
export const SOLAR_MINIMUM_YEAR = 2019.9;

const MINUTE_MS = 60_000;
const DAY_MS = 86_400_000;
const YEAR_MS = 365.25 * DAY_MS;
const LN10_04 = 0.4 * Math.LN10;
const RAD = Math.PI / 180;

/** Relative flux of a surface brightness: 10^(−0.4·m). */
export function flux(mag: number): number {
  return Math.exp(-LN10_04 * mag);
}
/** Surface brightness of a relative flux. */
export function magOf(f: number): number {
  return -Math.log(f) / LN10_04;
}

/** mulberry32: a small 32-bit seeded PRNG; returns a function giving floats in [0, 1). */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Mixes two integers into a 32-bit seed (murmur3 finaliser). */
export function mixSeed(a: number, b: number): number {
  let h = (Math.imul(a | 0, 0x9e3779b1) ^ (b | 0)) >>> 0;
  h = Math.imul(h ^ (h >>> 16), 0x85ebca6b);
  h = Math.imul(h ^ (h >>> 13), 0xc2b2ae35);
  return (h ^ (h >>> 16)) >>> 0;
}

function gaussian(rand: () => number): number {
  const u = 1 - rand(); // (0, 1]
  const v = rand();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

function decimalYear(ms: number): number {
  return 1970 + ms / YEAR_MS;
}

/** Airglow drift of the natural sky in magnitudes (positive = darker) at an instant. */
export function airglowDriftMag(date: Date, amplitudeMag = AIRGLOW_AMPLITUDE_MAG): number {
  const y = decimalYear(date.getTime());
  return amplitudeMag * Math.cos((2 * Math.PI * (y - SOLAR_MINIMUM_YEAR)) / SOLAR_CYCLE_YEARS);
}

/** The model's twilight sky from the Sun's geometric altitude (mag/arcsec²). */
export function twilightMag(sunAltDeg: number): number {
  return 25.0 - 1.1 * (sunAltDeg + 18);
}

/** The model's moonlit sky from the Moon alone (relative flux); 0 below the horizon. */
export function moonFlux(moonAltDeg: number, moonFraction: number): number {
  if (moonAltDeg <= 0) return 0;
  return (
    flux(18.0) * moonFraction * moonFraction * moonFraction * Math.sqrt(Math.sin(moonAltDeg * RAD))
  );
}

export type SimStation = { lat: number; lon: number; timeZone: string };

export type SimulateOptions = {
  station: SimStation;
  seed: number;
  /** Clear, moonless sky at startDate (airglow-neutral), mag/arcsec²: ~21.8 dark, 17–19 lit. */
  baseMag: number;
  /** Trend of the artificial part from startDate, mag/arcsec² per year (negative = brighter). */
  brighteningMagPerYear?: number;
  /** A sudden change (new lighting) from a night on. */
  step?: { fromNight: string; deltaMag: number };
  cadenceMin?: number;
  /** YYYY-MM-DD the trend counts from. */
  startDate: string;
  cloudyNightFraction?: number;
  airglowAmplitudeMag?: number;
  noiseMag?: number;
  /** Share a cache across calls (defaults to a fresh one with 10-minute knots). */
  cache?: SkyCache;
};

export type SimReading = { takenAt: Date; mag: number; tempC: number };

function nightNumber(night: string): number {
  return Math.round(Date.parse(`${night}T00:00:00Z`) / DAY_MS);
}

function dayOfYear(ms: number): number {
  const d = new Date(ms);
  return (ms - Date.UTC(d.getUTCFullYear(), 0, 1)) / DAY_MS;
}

type Patch = { start: number; end: number; opacity: number };

/** One night's readings, from when the Sun sinks below −6° until it rises above it again. */
export function simulateStationNight(options: SimulateOptions & { night: string }): SimReading[] {
  const { station, night } = options;
  const cache = options.cache ?? createSkyCache({ stepMin: 10, maxKnots: 4000 });
  const cadenceMs = (options.cadenceMin ?? 1) * MINUTE_MS;
  const rate = options.brighteningMagPerYear ?? 0;
  const noise = options.noiseMag ?? 0.025;
  const airglowAmp = options.airglowAmplitudeMag ?? AIRGLOW_AMPLITUDE_MAG;
  const cloudyFraction = options.cloudyNightFraction ?? 0.3;
  const startMs = Date.parse(`${options.startDate}T00:00:00Z`);
  if (!Number.isFinite(startMs)) throw new Error("startDate must be YYYY-MM-DD");

  const rand = mulberry32(mixSeed(options.seed, nightNumber(night)));
  const bounds = nightBounds(night, station.timeZone);
  const t0 = Math.ceil(bounds.start.getTime() / cadenceMs) * cadenceMs;
  const tEnd = bounds.end.getTime();

  // Night-level draws, always in the same order so a night's output depends on its seed only.
  const nightOffset = 0.03 * gaussian(rand);
  const cloudy = rand() < cloudyFraction;
  const patches: Patch[] = [];
  const nPatches = 1 + Math.floor(rand() * 4);
  for (let p = 0; p < nPatches; p++) {
    const centre = t0 + rand() * (tEnd - t0);
    const half = (15 + rand() * 75) * MINUTE_MS;
    const opacity = 0.4 + 0.6 * rand();
    if (cloudy) patches.push({ start: centre - half, end: centre + half, opacity });
  }
  const tempOffset = 2 * gaussian(rand);

  const naturalMag = Math.max(options.baseMag, NATURAL_SKY_MAG);
  const naturalBaseFlux = flux(naturalMag);
  const midNightDate = new Date((t0 + tEnd) / 2);
  const naturalFlux = flux(naturalMag + airglowDriftMag(midNightDate, airglowAmp) + nightOffset);
  const years = ((t0 + tEnd) / 2 - startMs) / YEAR_MS;
  const stepDelta = options.step && night >= options.step.fromNight ? options.step.deltaMag : 0;
  const artificialFlux = Math.max(
    0,
    flux(options.baseMag + rate * years + stepDelta) - naturalBaseFlux,
  );

  const doy = dayOfYear(t0);
  const season = Math.cos((2 * Math.PI * (doy - (station.lat >= 0 ? 200 : 17))) / 365.25);
  const meanTemp =
    25 - 0.35 * Math.abs(station.lat) + (Math.abs(station.lat) / 60) * 12 * season + tempOffset;

  const out: SimReading[] = [];
  let ar = 0;
  for (let t = t0; t < tEnd; t += cadenceMs) {
    const date = new Date(t);
    const sky = skyAt(cache, date, station.lat, station.lon);
    if (sky.sunAltDeg >= -6) continue;

    let cover = 0;
    for (const p of patches) {
      if (t <= p.start || t >= p.end) continue;
      const edge = Math.min(t - p.start, p.end - t) / (10 * MINUTE_MS);
      cover = Math.max(cover, p.opacity * Math.min(1, edge));
    }
    ar = 0.6 * ar + 0.8 * gaussian(rand);
    const e = gaussian(rand);
    const tn = gaussian(rand);
    const c = cover > 0 ? cover * (0.6 + 0.4 * Math.tanh(ar)) : 0;

    const total =
      naturalFlux * (1 - 0.25 * c) +
      artificialFlux * (1 + 2 * c) +
      flux(twilightMag(sky.sunAltDeg)) +
      moonFlux(sky.moonAltDeg, sky.moonFraction) * (1 + c);
    const mag = magOf(total) + (noise + 0.08 * c) * e;

    const solarHour = ((((t % DAY_MS) / 3_600_000 + station.lon / 15) % 24) + 24) % 24;
    const tempC = meanTemp + 5 * Math.cos((2 * Math.PI * (solarHour - 15)) / 24) + 0.2 * tn;
    out.push({
      takenAt: date,
      mag: Math.round(mag * 100) / 100,
      tempC: Math.round(tempC * 10) / 10,
    });
  }
  return out;
}

/**
 * Many nights, one at a time (memory stays flat: one night's readings and a bounded cache).
 * Yields every night from fromNight to toNight inclusive, including nights with no readings.
 */
export function* simulateStationRange(
  options: SimulateOptions & { fromNight: string; toNight: string },
): Generator<{ night: string; readings: SimReading[] }> {
  const cache = options.cache ?? createSkyCache({ stepMin: 10, maxKnots: 4000 });
  for (let night = options.fromNight; night <= options.toNight; night = addDays(night, 1)) {
    yield { night, readings: simulateStationNight({ ...options, night, cache }) };
  }
}
