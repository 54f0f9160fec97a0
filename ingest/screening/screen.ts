/**
 * Screening of one reading from its stored inputs (geometric sun and moon altitudes, see
 * sky-positions.ts) and of its value. Pure; thresholds come from the site (db/schema/sites.ts).
 *
 * Decisions:
 * - daylight: geometric Sun altitude ≥ 0°.
 * - twilight: sunMaxAltDeg ≤ Sun < 0° (default −18°: night is below −18°, Explanatory Supplement to
 *   the Astronomical Almanac). A reading exactly at the limit is twilight. Daylight and twilight are
 *   exclusive; civil, nautical and astronomical twilight are all "twilight".
 * - moonlit: geometric Moon altitude ≥ moonMaxAltDeg (default 0°, the horizon; the literature also
 *   uses −5° and −10°, so it is a per-site setting). The illuminated fraction is stored but not used
 *   here.
 * - out-of-range: value outside [10, 22.6] mag/arcsec². Common practice, not a standard: hand-held and
 *   fixed zenith meters of the usual kind are calibrated over roughly that range, so values outside it
 *   are stored but not counted. Configurable.
 * - rejection (validateMag): the value is not stored at all unless it is a finite number in [0, 24].
 *   Brighter than 0 mag/arcsec² is a luminance above ~1.08e5 cd/m² (K = 1.08e5, see DOMAIN.md), more
 *   than a daylight sky; darker than 24 is well below the natural airglow floor (~22 mag/arcsec²) a
 *   zenith sky can reach from the ground.
 */
import { DAYLIGHT, MOONLIT, OUT_OF_RANGE, TWILIGHT } from "../../lib/flags";

export type ScreenThresholds = {
  /** Sun must be strictly below this geometric altitude for a reading to count (default −18°). */
  sunMaxAltDeg: number;
  /** Moon must be strictly below this geometric altitude for a reading to count (default 0°). */
  moonMaxAltDeg: number;
  /** Meter's usual calibrated range (defaults 10 and 22.6 mag/arcsec²). */
  magMin: number;
  magMax: number;
};

export const DEFAULT_SCREEN_THRESHOLDS: ScreenThresholds = {
  sunMaxAltDeg: -18,
  moonMaxAltDeg: 0,
  magMin: 10,
  magMax: 22.6,
};

/** Physically possible range for a stored reading (mag/arcsec²). */
export const MAG_REJECT_MIN = 0;
export const MAG_REJECT_MAX = 24;

export function screenReading(
  reading: { mag: number; sunAltDeg: number; moonAltDeg: number },
  thresholds: Partial<ScreenThresholds> = {},
): number {
  const sunMax = thresholds.sunMaxAltDeg ?? DEFAULT_SCREEN_THRESHOLDS.sunMaxAltDeg;
  const moonMax = thresholds.moonMaxAltDeg ?? DEFAULT_SCREEN_THRESHOLDS.moonMaxAltDeg;
  const magMin = thresholds.magMin ?? DEFAULT_SCREEN_THRESHOLDS.magMin;
  const magMax = thresholds.magMax ?? DEFAULT_SCREEN_THRESHOLDS.magMax;
  let mask = 0;
  if (reading.sunAltDeg >= 0) mask |= DAYLIGHT;
  else if (reading.sunAltDeg >= sunMax) mask |= TWILIGHT;
  if (reading.moonAltDeg >= moonMax) mask |= MOONLIT;
  if (!(reading.mag >= magMin && reading.mag <= magMax)) mask |= OUT_OF_RANGE;
  return mask;
}

/**
 * Whether a value may be stored at all. Returns null when it may, otherwise the reason (shown to
 * the volunteer; a rejected value is reported, never silently dropped).
 */
export function validateMag(mag: unknown): string | null {
  if (typeof mag !== "number") return "mag must be a number (mag/arcsec²)";
  if (Number.isNaN(mag)) return "mag is not a number (NaN)";
  if (!Number.isFinite(mag)) return "mag must be finite";
  if (mag < MAG_REJECT_MIN)
    return `mag ${mag} is brighter than ${MAG_REJECT_MIN} mag/arcsec² (over 1e5 cd/m², brighter than a daylight sky): not a night-sky reading`;
  if (mag > MAG_REJECT_MAX)
    return `mag ${mag} is darker than ${MAG_REJECT_MAX} mag/arcsec², below the natural airglow floor: physically impossible from the ground`;
  return null;
}
