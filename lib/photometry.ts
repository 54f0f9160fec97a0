/**
 * Photometry of the night sky: zenith surface brightness in mag/arcsec² (V band) and what it
 * means in luminance, ratio to a natural sky, naked-eye limiting magnitude and dark-sky classes.
 *
 * Conventions: a bigger magnitude is a darker sky; 5 magnitudes is a factor of 100 (Pogson).
 * Every published constant carries its source; values marked [mem] are from memory and
 * [calc] values follow from the stated formula. Pure module: no framework imports.
 */
import { requireFinite, requirePositive } from "./validate-number";

// ---------------------------------------------------------------------------------------------
// Constants
// ---------------------------------------------------------------------------------------------

/**
 * K in L[cd/m²] = K · 10^(−0.4·m). Follows from the illuminance of a V = 0 star above the
 * atmosphere, 2.54×10⁻⁶ lx (Allen's Astrophysical Quantities, Cox 2000), spread over one
 * arcsec² (2.3504×10⁻¹¹ sr) [mem/calc].
 */
export const LUMINANCE_K_CD_M2 = 1.08e5;

/**
 * K implied by Falchi et al. 2016 (Science Advances 2:e1600377), who take
 * 22.0 mag/arcsec² = 174 µcd/m² [pub]; 174e-6 / 10^(−0.4·22) ≈ 1.098×10⁵ [calc].
 * Bará et al. 2020 (MNRAS 493:2429) show K depends on the sky spectrum (1.11–1.34×10⁵ AB) [pub].
 */
export const FALCHI_2016_K = 1.098e5;

/** Natural zenith sky brightness, V band: 22.0 mag/arcsec² (Falchi et al. 2016) [pub]. */
export const NATURAL_SKY_MAG = 22.0;

/** Pogson ratio, 100^(1/5) ≈ 2.511886 per magnitude (Pogson 1856 definition) [calc]. */
export const POGSON_RATIO = Math.pow(100, 1 / 5);

/**
 * Constants of the closed form NELM = 7.93 − 5·log₁₀(1 + 10^(4.316 − m/5)), derived from
 * Schaefer 1990 (PASP 102:212) with Garstang's 1986 unit conversion [calc; the closed form is
 * not printed in a paper].
 */
export const NELM_ZERO_SKY_LIMIT_MAG = 7.93;
export const NELM_SKY_TERM = 4.316;

/**
 * Falchi et al. 2016 atlas classes as artificial/natural brightness ratios [pub for 1 %, 8 %,
 * 50 %]. The two brightest limits ("loss of the Milky Way", "cone vision") are taken as 688 and
 * 3000 µcd/m² of artificial brightness over a 174 µcd/m² natural sky [mem]; they reproduce the
 * total-brightness limits 20.26 and 18.85 mag/arcsec² on a 22.0 base [calc, DOMAIN.md].
 */
export const ATLAS_ARTIFICIAL_RATIO_LIMITS = [0.01, 0.08, 0.5, 688 / 174, 3000 / 174] as const;

// ---------------------------------------------------------------------------------------------
// Validation
// ---------------------------------------------------------------------------------------------


// ---------------------------------------------------------------------------------------------
// Luminance
// ---------------------------------------------------------------------------------------------

/** Surface brightness (mag/arcsec²) → luminance in cd/m²: L = K · 10^(−0.4·m). */
export function magToLuminanceCdM2(magArcsec2: number, k: number = LUMINANCE_K_CD_M2): number {
  requireFinite("magArcsec2", magArcsec2);
  requirePositive("k", k);
  return k * Math.pow(10, -0.4 * magArcsec2);
}

/** Luminance in cd/m² → surface brightness (mag/arcsec²): m = −2.5·log₁₀(L/K). */
export function luminanceCdM2ToMag(luminanceCdM2: number, k: number = LUMINANCE_K_CD_M2): number {
  requirePositive("luminanceCdM2", luminanceCdM2);
  requirePositive("k", k);
  return -2.5 * Math.log10(luminanceCdM2 / k);
}

/** Surface brightness (mag/arcsec²) → luminance in mcd/m². */
export function magToMcdM2(magArcsec2: number, k: number = LUMINANCE_K_CD_M2): number {
  return magToLuminanceCdM2(magArcsec2, k) * 1e3;
}

/** Surface brightness (mag/arcsec²) → luminance in µcd/m². */
export function magToUcdM2(magArcsec2: number, k: number = LUMINANCE_K_CD_M2): number {
  return magToLuminanceCdM2(magArcsec2, k) * 1e6;
}

// ---------------------------------------------------------------------------------------------
// Ratios (Pogson)
// ---------------------------------------------------------------------------------------------

/** Brightness ratio for a magnitude difference: 100^(Δm/5) = 10^(0.4·Δm). */
export function magDiffToRatio(deltaMag: number): number {
  requireFinite("deltaMag", deltaMag);
  return Math.pow(10, 0.4 * deltaMag);
}

/** Magnitude difference for a brightness ratio: Δm = 2.5·log₁₀(ratio). */
export function ratioToMagDiff(ratio: number): number {
  requirePositive("ratio", ratio);
  return 2.5 * Math.log10(ratio);
}

/**
 * Total sky brightness divided by the natural sky brightness (1 = natural; 2 = twice as bright).
 * ratio = 10^(0.4·(naturalMag − mag)).
 */
export function ratioToNatural(magArcsec2: number, naturalMag: number = NATURAL_SKY_MAG): number {
  requireFinite("magArcsec2", magArcsec2);
  requireFinite("naturalMag", naturalMag);
  return Math.pow(10, 0.4 * (naturalMag - magArcsec2));
}

/**
 * Artificial brightness as a percentage of the natural sky: 100·(ratio − 1), clamped at 0 for a
 * sky measured at or darker than the natural reference.
 */
export function artificialPercent(
  magArcsec2: number,
  naturalMag: number = NATURAL_SKY_MAG,
): number {
  const r = ratioToNatural(magArcsec2, naturalMag);
  return Math.max(0, 100 * (r - 1));
}

// ---------------------------------------------------------------------------------------------
// Naked-eye limiting magnitude
// ---------------------------------------------------------------------------------------------

/** Naked-eye limiting magnitude from zenith sky brightness: 7.93 − 5·log₁₀(1 + 10^(4.316 − m/5)). */
export function nelmFromMag(magArcsec2: number): number {
  requireFinite("magArcsec2", magArcsec2);
  return NELM_ZERO_SKY_LIMIT_MAG - 5 * Math.log10(1 + Math.pow(10, NELM_SKY_TERM - magArcsec2 / 5));
}

/**
 * Inverse of nelmFromMag: m = 5·(4.316 − log₁₀(10^((7.93 − NELM)/5) − 1)).
 * Defined only for NELM < 7.93 (the limit for a perfectly dark sky); throws RangeError otherwise.
 */
export function magFromNelm(nelm: number): number {
  requireFinite("nelm", nelm);
  if (nelm >= NELM_ZERO_SKY_LIMIT_MAG) {
    throw new RangeError(
      `nelm must be below ${NELM_ZERO_SKY_LIMIT_MAG} (the limit for a perfectly dark sky); got ${nelm}`,
    );
  }
  const inner = Math.pow(10, (NELM_ZERO_SKY_LIMIT_MAG - nelm) / 5) - 1;
  return 5 * (NELM_SKY_TERM - Math.log10(inner));
}

// ---------------------------------------------------------------------------------------------
// Bortle (approximate) and atlas classes
// ---------------------------------------------------------------------------------------------

export type BortleClass = 1 | 2 | 3 | 4 | 5 | 6 | 7 | 8;

export interface BortleApprox {
  /** 1..8; the 8–9 band is reported as 8 with label "8–9". */
  class: BortleClass;
  label: string;
  approximate: true;
}

/**
 * Lower bounds (inclusive) of the commonly quoted mag/arcsec² ranges for the Bortle dark-sky
 * scale (Bortle 2001, Sky & Telescope, Feb 2001 [pub]; the mag ranges are not in the article and
 * are common practice [mem]): 1: ≥21.99; 2: 21.89–21.99; 3: 21.69–21.89; 4: 20.49–21.69;
 * 5: 19.50–20.49; 6: 18.94–19.50; 7: 18.38–18.94; 8–9: <18.38.
 */
export const BORTLE_APPROX_LOWER_MAG: readonly {
  class: BortleClass;
  label: string;
  minMag: number;
}[] = [
  { class: 1, label: "1", minMag: 21.99 },
  { class: 2, label: "2", minMag: 21.89 },
  { class: 3, label: "3", minMag: 21.69 },
  { class: 4, label: "4", minMag: 20.49 },
  { class: 5, label: "5", minMag: 19.5 },
  { class: 6, label: "6", minMag: 18.94 },
  { class: 7, label: "7", minMag: 18.38 },
  { class: 8, label: "8–9", minMag: Number.NEGATIVE_INFINITY },
];

/** Approximate Bortle class from zenith sky brightness (always flagged approximate). */
export function bortleApprox(magArcsec2: number): BortleApprox {
  requireFinite("magArcsec2", magArcsec2);
  for (const band of BORTLE_APPROX_LOWER_MAG) {
    if (magArcsec2 >= band.minMag) {
      return { class: band.class, label: band.label, approximate: true };
    }
  }
  // Unreachable: the last band's lower bound is −∞.
  return { class: 8, label: "8–9", approximate: true };
}

export type AtlasClass = 1 | 2 | 3 | 4 | 5 | 6;

export interface AtlasClassResult {
  class: AtlasClass;
  label: string;
  /** Artificial brightness as a fraction of natural (0.05 = 5 %). */
  artificialRatio: number;
}

const ATLAS_LABELS: Record<AtlasClass, string> = {
  1: "pristine (artificial ≤ 1 % of natural)",
  2: "nearly pristine (1–8 %)",
  3: "affected (8–50 %)",
  4: "brightened, Milky Way fading (50 % to Milky Way loss)",
  5: "Milky Way lost (up to cone vision at night)",
  6: "night vision lost (eyes stay in cone vision)",
};

/**
 * Class of the Falchi et al. 2016 world atlas by the artificial-to-natural brightness ratio
 * (own labels; the atlas's colours are not reused). A limit belongs to the darker class
 * (≤ 1 % is class 1).
 */
export function atlasClass(
  magArcsec2: number,
  naturalMag: number = NATURAL_SKY_MAG,
): AtlasClassResult {
  const artificialRatio = Math.max(0, ratioToNatural(magArcsec2, naturalMag) - 1);
  let cls = 1;
  for (const limit of ATLAS_ARTIFICIAL_RATIO_LIMITS) {
    if (artificialRatio > limit) cls += 1;
  }
  const c = cls as AtlasClass;
  return { class: c, label: ATLAS_LABELS[c], artificialRatio };
}

/** The atlas class limits expressed as total brightness in mag/arcsec² on the given natural base. */
export function atlasClassLimitsMag(naturalMag: number = NATURAL_SKY_MAG): number[] {
  requireFinite("naturalMag", naturalMag);
  return ATLAS_ARTIFICIAL_RATIO_LIMITS.map((r) => naturalMag - 2.5 * Math.log10(1 + r));
}

// ---------------------------------------------------------------------------------------------
// Trend slopes
// ---------------------------------------------------------------------------------------------

/**
 * Percent brighter per year from a slope in mag/arcsec² per year: 100·(10^(−0.4·s) − 1).
 * A NEGATIVE slope (magnitudes falling) means the sky is getting BRIGHTER, so −0.0995 gives
 * +9.6 %/yr (Kyba et al. 2023, Science 379:265) [calc].
 */
export function brighteningPercentPerYear(slopeMagPerYear: number): number {
  requireFinite("slopeMagPerYear", slopeMagPerYear);
  return 100 * (Math.pow(10, -0.4 * slopeMagPerYear) - 1);
}

/** Same as brighteningPercentPerYear (kept for callers that use the longer name). */
export const percentPerYearFromSlope = brighteningPercentPerYear;

/** Inverse of brighteningPercentPerYear: slope (mag/arcsec²/yr) = −2.5·log₁₀(1 + p/100). */
export function slopeMagPerYearFromBrighteningPercent(percentPerYear: number): number {
  requireFinite("percentPerYear", percentPerYear);
  if (percentPerYear <= -100) {
    throw new RangeError(`percentPerYear must be greater than −100 (got ${percentPerYear})`);
  }
  return -2.5 * Math.log10(1 + percentPerYear / 100);
}

// ---------------------------------------------------------------------------------------------
// Everything at once (body of the public conversion endpoint)
// ---------------------------------------------------------------------------------------------

export interface ConvertOptions {
  /** K in cd/m² for L = K·10^(−0.4·m); default LUMINANCE_K_CD_M2. */
  k?: number;
  /** Natural sky reference in mag/arcsec²; default NATURAL_SKY_MAG. */
  naturalMag?: number;
}

export interface SourcedConstant {
  value: number;
  unit: string;
  source: string;
}

export interface ConvertAllResult {
  input: { magArcsec2: number; k: number; naturalMag: number };
  luminanceCdM2: number;
  luminanceMcdM2: number;
  luminanceUcdM2: number;
  ratioToNatural: number;
  artificialPercent: number;
  nelm: number;
  bortleApprox: BortleApprox;
  constants: {
    luminanceK: SourcedConstant;
    falchi2016K: SourcedConstant;
    naturalSkyMag: SourcedConstant;
    pogsonRatio: SourcedConstant;
  };
}

/** All conversions for one zenith reading, with the constants used and their sources. */
export function convertAll(magArcsec2: number, opts: ConvertOptions = {}): ConvertAllResult {
  requireFinite("magArcsec2", magArcsec2);
  const k = opts.k === undefined ? LUMINANCE_K_CD_M2 : requirePositive("k", opts.k);
  const naturalMag =
    opts.naturalMag === undefined ? NATURAL_SKY_MAG : requireFinite("naturalMag", opts.naturalMag);
  const luminanceCdM2 = magToLuminanceCdM2(magArcsec2, k);
  return {
    input: { magArcsec2, k, naturalMag },
    luminanceCdM2,
    luminanceMcdM2: luminanceCdM2 * 1e3,
    luminanceUcdM2: luminanceCdM2 * 1e6,
    ratioToNatural: ratioToNatural(magArcsec2, naturalMag),
    artificialPercent: artificialPercent(magArcsec2, naturalMag),
    nelm: nelmFromMag(magArcsec2),
    bortleApprox: bortleApprox(magArcsec2),
    constants: {
      luminanceK: {
        value: k,
        unit: "cd/m²",
        source:
          k === LUMINANCE_K_CD_M2
            ? "V = 0 illuminance 2.54e-6 lx (Allen's Astrophysical Quantities, Cox 2000) over one arcsec²"
            : "caller-supplied",
      },
      falchi2016K: {
        value: FALCHI_2016_K,
        unit: "cd/m²",
        source: "Falchi et al. 2016, Science Advances 2:e1600377: 22.0 mag/arcsec² = 174 µcd/m²",
      },
      naturalSkyMag: {
        value: naturalMag,
        unit: "mag/arcsec²",
        source:
          naturalMag === NATURAL_SKY_MAG
            ? "Falchi et al. 2016, Science Advances 2:e1600377"
            : "caller-supplied",
      },
      pogsonRatio: {
        value: POGSON_RATIO,
        unit: "ratio per magnitude",
        source: "Pogson: 100^(1/5) per magnitude",
      },
    },
  };
}
