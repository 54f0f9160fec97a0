/**
 * The public converter's one verb: parse the query, convert with lib/photometry.ts, and say clearly
 * what was wrong with bad input (a 400 through lib/errors.ts).
 */
import { badRequest } from "@/lib/errors";
import { convertAll, luminanceCdM2ToMag, magDiffToRatio, magFromNelm, NELM_ZERO_SKY_LIMIT_MAG } from "@/lib/photometry";

/** A zenith reading outside this range is not a night sky (or not a reading). */
export const MAG_MIN = 0;
export const MAG_MAX = 25;

function number(name: string, raw: string | null, min: number, max: number, hint: string): number | null {
  if (raw === null) return null;
  const s = raw.trim();
  if (s === "") throw badRequest(`${name} is empty; give a number (${hint}).`);
  const v = Number(s.replace(",", "."));
  if (!Number.isFinite(v)) throw badRequest(`${name} must be a number (${hint}); got "${raw.slice(0, 40)}".`);
  if (v < min || v > max) throw badRequest(`${name} must be between ${min} and ${max} (${hint}); got ${v}.`);
  return v;
}

export function convertQuery(sp: URLSearchParams) {
  const mag = number("mag", sp.get("mag"), MAG_MIN, MAG_MAX, "zenith sky brightness in mag/arcsec², e.g. 21.5");
  const mag2 = number("mag2", sp.get("mag2"), MAG_MIN, MAG_MAX, "a second reading in mag/arcsec²");
  const lum = number("luminanceCdM2", sp.get("luminanceCdM2"), 1e-9, 1e4, "luminance in cd/m², e.g. 0.000271");
  const nelm = number("nelm", sp.get("nelm"), -2, NELM_ZERO_SKY_LIMIT_MAG - 0.001, `naked-eye limiting magnitude below ${NELM_ZERO_SKY_LIMIT_MAG}`);
  const given = [mag, lum, nelm].filter((v) => v !== null).length;
  if (given === 0) throw badRequest("Give one of mag (mag/arcsec²), luminanceCdM2 (cd/m²) or nelm (naked-eye limiting magnitude).");
  if (given > 1) throw badRequest("Give only one of mag, luminanceCdM2 or nelm.");
  if (mag2 !== null && mag === null) throw badRequest("mag2 compares with mag: give both.");

  const from = mag !== null ? "mag" : lum !== null ? "luminanceCdM2" : "nelm";
  const m = mag ?? (lum !== null ? luminanceCdM2ToMag(lum) : magFromNelm(nelm!));
  if (m < MAG_MIN || m > MAG_MAX) throw badRequest(`That corresponds to ${m.toFixed(2)} mag/arcsec², outside ${MAG_MIN}–${MAG_MAX}.`);
  const c = convertAll(m);
  const body: Record<string, unknown> = {
    from,
    magArcsec2: m,
    luminanceCdM2: c.luminanceCdM2,
    luminanceMcdM2: c.luminanceMcdM2,
    ratioToNatural: c.ratioToNatural,
    artificialPercent: c.artificialPercent,
    nelm: c.nelm,
    bortleApprox: c.bortleApprox,
    constants: c.constants,
    notes: [
      "A bigger mag/arcsec² is a darker sky; 5 magnitudes is a factor of 100 in brightness (Pogson).",
      "NELM: 7.93 − 5·log₁₀(1 + 10^(4.316 − m/5)), after Schaefer 1990 (PASP 102:212) with Garstang 1986.",
      "Bortle class from commonly quoted mag ranges, not from Bortle 2001 itself: approximate.",
    ],
  };
  if (mag2 !== null) {
    const delta = mag2 - m;
    const ratio = magDiffToRatio(Math.abs(delta));
    body.difference = {
      mag: m,
      mag2,
      deltaMag: delta,
      ratio,
      brighter: delta === 0 ? "neither" : delta < 0 ? "mag2" : "mag",
      text: delta === 0 ? "The two skies are equally bright." : `The ${delta < 0 ? "second" : "first"} sky is ${ratio.toFixed(3)}× as bright as the other.`,
    };
  }
  return body;
}
