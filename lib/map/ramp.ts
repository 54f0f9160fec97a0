/**
 * The darkness ramp: Nightmark's own seven classes of zenith sky brightness, drawn with the design
 * tokens ramp-0 (brightest sky) … ramp-6 (darkest). The limits are round numbers chosen for this
 * product so that the network's typical range (cities 15–19, dark rural ~21.8; Posch et al. 2018)
 * spreads over the classes; they are not any published scale. Pure module (used on both sides).
 */

/** Lower bounds (inclusive) in mag/arcsec² of classes 1…6; class 0 is everything brighter than 18.0. */
export const RAMP_LOWER_MAG = [18.0, 19.0, 20.0, 21.0, 21.5, 21.8] as const;

export type RampClass = 0 | 1 | 2 | 3 | 4 | 5 | 6;

export function rampClass(magArcsec2: number): RampClass {
  let c = 0;
  for (const lower of RAMP_LOWER_MAG) if (magArcsec2 >= lower) c += 1;
  return c as RampClass;
}

export type RampBand = { class: RampClass; label: string; minMag: number | null; maxMag: number | null; words: string };

const WORDS = ["city sky", "suburban sky", "bright rural", "rural", "dark rural", "dark", "near natural"];

export const RAMP_BANDS: RampBand[] = WORDS.map((words, i) => {
  const min = i === 0 ? null : (RAMP_LOWER_MAG[i - 1] ?? null);
  const max = i === 6 ? null : (RAMP_LOWER_MAG[i] ?? null);
  const label = min === null ? `< ${max!.toFixed(1)}` : max === null ? `≥ ${min.toFixed(1)}` : `${min.toFixed(1)}–${max.toFixed(1)}`;
  return { class: i as RampClass, label, minMag: min, maxMag: max, words };
});

/**
 * Circle radius (px) by class, so colour is never the only cue: a brighter sky draws a bigger
 * circle (more light), a dark one a small, tight dot.
 */
export function rampRadiusPx(c: RampClass): number {
  return 11 - c;
}
