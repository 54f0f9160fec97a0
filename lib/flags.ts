/**
 * Reading flags: a bitmask stored with every reading (readings.flags, a smallint).
 *
 * A reading is *usable* (counts toward a night summary) only when no flag is set. Flags record why a
 * reading says nothing about artificial light; the raw value is always kept.
 *
 * - DAYLIGHT: the Sun's geometric (unrefracted) altitude is at or above 0°.
 * - TWILIGHT: the Sun is below 0° but at or above the site's limit (default −18°, the end of
 *   astronomical twilight; Explanatory Supplement to the Astronomical Almanac).
 * - MOONLIT: the Moon's geometric altitude is at or above the site's moon limit (default 0°).
 * - CLOUD_SUSPECT: the readings around this one are too jumpy (set when a whole night is summarised).
 * - OUT_OF_RANGE: the value is outside the range meters of this kind are usually calibrated for.
 */

export const DAYLIGHT = 1;
export const TWILIGHT = 2;
export const MOONLIT = 4;
export const CLOUD_SUSPECT = 8;
export const OUT_OF_RANGE = 16;

export const ALL_FLAGS = DAYLIGHT | TWILIGHT | MOONLIT | CLOUD_SUSPECT | OUT_OF_RANGE;

export type FlagName = "daylight" | "twilight" | "moonlit" | "cloud-suspect" | "out-of-range";

const FLAG_TABLE: ReadonlyArray<readonly [number, FlagName]> = [
  [DAYLIGHT, "daylight"],
  [TWILIGHT, "twilight"],
  [MOONLIT, "moonlit"],
  [CLOUD_SUSPECT, "cloud-suspect"],
  [OUT_OF_RANGE, "out-of-range"],
];

/** The names of the flags set in `mask`, in bit order. Unknown bits are ignored. */
export function flagNames(mask: number): FlagName[] {
  const out: FlagName[] = [];
  for (const [bit, name] of FLAG_TABLE) if ((mask & bit) !== 0) out.push(name);
  return out;
}

/** The mask for a list of flag names (inverse of flagNames). */
export function flagMask(names: readonly FlagName[]): number {
  let mask = 0;
  for (const [bit, name] of FLAG_TABLE) if (names.includes(name)) mask |= bit;
  return mask;
}

/** A reading counts toward a night summary only when no flag is set. */
export function isUsable(mask: number): boolean {
  return mask === 0;
}

export type ExplainReading = {
  mag: number;
  sunAltDeg: number;
  moonAltDeg: number;
  moonFraction?: number | null;
};

export type ExplainThresholds = {
  sunMaxAltDeg: number;
  moonMaxAltDeg: number;
  cloudWindowMin?: number;
  cloudSpreadMag?: number;
  /** The meter's usual calibrated range, mag/arcsec² (defaults 10 and 22.6, see ingest/screening/screen.ts). */
  magMin?: number;
  magMax?: number;
};

/** A number with one decimal and a true minus sign (U+2212), e.g. "−14.2". */
export function formatSigned(value: number, decimals = 1): string {
  const s = Math.abs(value).toFixed(decimals);
  // −0.0 prints as 0.0
  return value < 0 && Number(s) !== 0 ? `\u2212${s}` : s;
}

function deg(value: number): string {
  return `${formatSigned(value)}°`;
}

/** A threshold: one decimal, trailing ".0" dropped ("−18°", "−5.5°"). */
function limitDeg(value: number): string {
  return `${formatSigned(value).replace(/\.0$/, "")}°`;
}

/** Twilight band named by the Sun's altitude (Explanatory Supplement to the Astronomical Almanac). */
export function twilightName(sunAltDeg: number): string {
  if (sunAltDeg >= 0) return "daylight";
  if (sunAltDeg >= -6) return "civil twilight";
  if (sunAltDeg >= -12) return "nautical twilight";
  if (sunAltDeg >= -18) return "astronomical twilight";
  return "astronomical night";
}

/**
 * Human sentences saying why a reading did or did not count. One sentence per flag set; a usable
 * reading gets one sentence saying that it counted and why.
 */
export function explainFlags(
  mask: number,
  reading: ExplainReading,
  thresholds: ExplainThresholds,
): string[] {
  const out: string[] = [];
  const { sunAltDeg, moonAltDeg, mag } = reading;
  const sunLimit = limitDeg(thresholds.sunMaxAltDeg);
  const moonLimit = limitDeg(thresholds.moonMaxAltDeg);
  const fraction =
    reading.moonFraction === undefined || reading.moonFraction === null
      ? ""
      : `, ${Math.round(reading.moonFraction * 100)} % illuminated`;

  if (isUsable(mask)) {
    out.push(
      `Counted: Sun at ${deg(sunAltDeg)}, below the ${sunLimit} limit, and Moon at ${deg(moonAltDeg)}, below the ${moonLimit} limit.`,
    );
    return out;
  }
  if (mask & DAYLIGHT) {
    out.push(`Sun at ${deg(sunAltDeg)}, above the horizon (daylight).`);
  }
  if (mask & TWILIGHT) {
    out.push(`Sun at ${deg(sunAltDeg)}, above the ${sunLimit} limit (${twilightName(sunAltDeg)}).`);
  }
  if (mask & MOONLIT) {
    out.push(`Moon at ${deg(moonAltDeg)}, above the ${moonLimit} limit (moonlit${fraction}).`);
  }
  if (mask & CLOUD_SUSPECT) {
    const spread = thresholds.cloudSpreadMag;
    const window = thresholds.cloudWindowMin;
    out.push(
      spread !== undefined && window !== undefined
        ? `Readings within ${formatSigned(window / 2, 1).replace(/\.0$/, "")} minutes of this one vary by more than ${spread.toFixed(2)} mag/arcsec² (cloud suspected).`
        : "Readings around this one vary too much (cloud suspected).",
    );
  }
  if (mask & OUT_OF_RANGE) {
    const lo = thresholds.magMin ?? 10;
    const hi = thresholds.magMax ?? 22.6;
    out.push(
      `${mag.toFixed(2)} mag/arcsec² is outside the meter's usual calibrated range ${lo}–${hi} (kept, not counted).`,
    );
  }
  return out;
}
