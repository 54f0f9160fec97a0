/**
 * Glow estimate: what a proposed development might add to the zenith sky brightness at a site.
 *
 * Walker's law (Walker 1977, PASP 89:405) [mem for details]: the sky glow toward a town grows in
 * proportion to its population and falls off as distance^−2.5, for roughly 10–50 km. The absolute
 * coefficient is not used: the site's measured artificial brightness (total − natural, linear
 * units) is shared among the known existing sources in proportion to their Walker weights, and
 * the proposed development adds its own Walker weight at the same scale.
 *
 * This is an approximation with a large uncertainty, not a compliance calculation.
 * Pure module; no framework imports.
 */

import { NATURAL_SKY_MAG } from "./photometry";
import { requireFinite, requirePositive } from "./validate-number";

/** Walker 1977 exponent of distance (glow ∝ population · d^−2.5) [mem]. */
export const WALKER_DISTANCE_EXPONENT = 2.5;

/** Walker 1977 range of validity, km (roughly 10–50 km) [mem]. */
export const WALKER_VALID_MIN_KM = 10;
export const WALKER_VALID_MAX_KM = 50;

/**
 * ASSUMPTION (a round figure chosen for this product, not a published constant): one person's
 * share of a town's outdoor lighting is taken as 1,000 lumens, so a development described by its
 * installed lumens counts as lumens / 1,000 people in Walker's law. Callers can override it.
 */
export const ASSUMED_LUMENS_PER_PERSON = 1000;

/** Mean Earth radius, km (IUGG mean radius R1, common practice) [mem]. */
export const EARTH_MEAN_RADIUS_KM = 6371.0088;

/** Caution shown with every glow estimate. */
export const GLOW_ESTIMATE_CAUTION =
  "Approximate: Walker's law (glow ∝ population × distance^−2.5) scaled from this site's " +
  "measured sky brightness. Real glow depends on the lamps' spectrum, shielding and direction, " +
  "terrain and the atmosphere. Not a compliance measurement; lighting design and code " +
  "compliance belong to qualified lighting professionals and the local codes.";


function requireNonNegative(name: string, value: unknown): number {
  const v = requireFinite(name, value);
  if (v < 0) throw new RangeError(`${name} must not be negative (got ${v})`);
  return v;
}

/**
 * Walker's law weight in relative units: population · distanceKm^−2.5.
 * Population may be 0 (adds nothing); distance must be positive.
 */
export function walkerGlow(population: number, distanceKm: number): number {
  requireNonNegative("population", population);
  requirePositive("distanceKm", distanceKm);
  return population * Math.pow(distanceKm, -WALKER_DISTANCE_EXPONENT);
}

export interface LatLon {
  lat: number;
  lon: number;
}

/**
 * Great-circle distance in km between two positions in degrees on a spherical Earth of radius
 * EARTH_MEAN_RADIUS_KM. Evaluated in the atan2 form (Vincenty's formula for the sphere), which
 * agrees with the haversine formula and stays accurate for near-antipodal points as well.
 */
export function haversineKm(a: LatLon, b: LatLon): number {
  for (const [name, p] of [
    ["a", a],
    ["b", b],
  ] as const) {
    requireFinite(`${name}.lat`, p.lat);
    requireFinite(`${name}.lon`, p.lon);
    if (p.lat < -90 || p.lat > 90)
      throw new RangeError(`${name}.lat must be in [−90, 90] (got ${p.lat})`);
    if (p.lon < -180 || p.lon > 180) {
      throw new RangeError(`${name}.lon must be in [−180, 180] (got ${p.lon})`);
    }
  }
  const rad = Math.PI / 180;
  const phi1 = a.lat * rad;
  const phi2 = b.lat * rad;
  const dLon = (b.lon - a.lon) * rad;
  const cosPhi1 = Math.cos(phi1);
  const cosPhi2 = Math.cos(phi2);
  const sinPhi1 = Math.sin(phi1);
  const sinPhi2 = Math.sin(phi2);
  const cosDLon = Math.cos(dLon);
  const y = Math.hypot(cosPhi2 * Math.sin(dLon), cosPhi1 * sinPhi2 - sinPhi1 * cosPhi2 * cosDLon);
  const x = sinPhi1 * sinPhi2 + cosPhi1 * cosPhi2 * cosDLon;
  return EARTH_MEAN_RADIUS_KM * Math.atan2(y, x);
}

export interface GlowSource {
  population: number;
  distanceKm: number;
}

export interface ProposedDevelopment {
  /** Added population. Give this or `lumens`, not both. */
  population?: number;
  /** Added installed outdoor lumens, converted with `lumensPerPerson`. */
  lumens?: number;
  distanceKm: number;
}

export interface GlowEstimateInput {
  site: { measuredMag: number; naturalMag?: number };
  existingSources: GlowSource[];
  proposed: ProposedDevelopment;
  /** Lumens per person for converting `proposed.lumens`; default ASSUMED_LUMENS_PER_PERSON. */
  lumensPerPerson?: number;
}

interface GlowEstimateCommon {
  /** True when every distance (existing and proposed) is within Walker's 10–50 km. */
  withinValidity: boolean;
  warnings: string[];
  caution: string;
  /** The population used for the proposed development (after any lumens conversion). */
  proposedEquivalentPopulation: number;
}

export interface GlowEstimateOk extends GlowEstimateCommon {
  ok: true;
  /** Added artificial brightness as a fraction of the site's current artificial brightness. */
  addedArtificialFraction: number;
  /** Added artificial brightness as a fraction of the natural sky brightness. */
  addedToNaturalRatio: number;
  /** Predicted zenith brightness, mag/arcsec². */
  newMag: number;
  /** newMag − measuredMag (≤ 0: negative means brighter), Pogson: −2.5·log₁₀(new/old). */
  deltaMag: number;
  /** Total sky brightness increase, %: 100·(new/old − 1). */
  percentBrighter: number;
  /** Artificial brightness as % of natural, now and predicted. */
  currentArtificialPercent: number;
  newArtificialPercent: number;
}

export interface GlowEstimateUnavailable extends GlowEstimateCommon {
  ok: false;
  reason: string;
  addedArtificialFraction: null;
  addedToNaturalRatio: null;
  newMag: null;
  deltaMag: null;
  percentBrighter: null;
  currentArtificialPercent: null;
  newArtificialPercent: null;
}

export type GlowEstimate = GlowEstimateOk | GlowEstimateUnavailable;

/**
 * Estimates the glow a proposed development adds at a site (see the module comment).
 * Throws RangeError for invalid input (non-positive distance or existing population, no
 * existing sources, a negative or missing proposed size). A site measured at or darker than the
 * natural reference has no measured artificial brightness to scale from: the result then has
 * ok: false and a reason.
 */
export function estimateAddedGlow(input: GlowEstimateInput): GlowEstimate {
  const measuredMag = requireFinite("site.measuredMag", input.site.measuredMag);
  const naturalMag =
    input.site.naturalMag === undefined
      ? NATURAL_SKY_MAG
      : requireFinite("site.naturalMag", input.site.naturalMag);

  if (!Array.isArray(input.existingSources) || input.existingSources.length === 0) {
    throw new RangeError(
      "existingSources must list at least one existing light source (the measured glow is scaled from them)",
    );
  }
  const warnings: string[] = [];
  let outside = false;
  const checkRange = (label: string, d: number) => {
    if (d < WALKER_VALID_MIN_KM || d > WALKER_VALID_MAX_KM) {
      outside = true;
      warnings.push(
        `${label} is ${d} km away, outside the ${WALKER_VALID_MIN_KM}–${WALKER_VALID_MAX_KM} km range where Walker's law roughly holds.`,
      );
    }
  };

  let existingWeight = 0;
  input.existingSources.forEach((src, i) => {
    requirePositive(`existingSources[${i}].population`, src.population);
    requirePositive(`existingSources[${i}].distanceKm`, src.distanceKm);
    checkRange(`Existing source ${i + 1}`, src.distanceKm);
    existingWeight += walkerGlow(src.population, src.distanceKm);
  });

  const proposed = input.proposed;
  requirePositive("proposed.distanceKm", proposed.distanceKm);
  const hasPop = proposed.population !== undefined;
  const hasLumens = proposed.lumens !== undefined;
  if (hasPop && hasLumens) {
    throw new RangeError("proposed: give population or lumens, not both");
  }
  if (!hasPop && !hasLumens) {
    throw new RangeError("proposed: give the added population or the added lumens");
  }
  let proposedEquivalentPopulation: number;
  if (hasPop) {
    proposedEquivalentPopulation = requireNonNegative("proposed.population", proposed.population);
  } else {
    const lumens = requireNonNegative("proposed.lumens", proposed.lumens);
    const lpp =
      input.lumensPerPerson === undefined
        ? ASSUMED_LUMENS_PER_PERSON
        : requirePositive("lumensPerPerson", input.lumensPerPerson);
    proposedEquivalentPopulation = lumens / lpp;
    warnings.push(
      `Lumens converted to an equivalent population at an assumed ${lpp} lm per person (an assumption, not a measured figure).`,
    );
  }
  checkRange("The proposed development", proposed.distanceKm);

  const common: GlowEstimateCommon = {
    withinValidity: !outside,
    warnings,
    caution: GLOW_ESTIMATE_CAUTION,
    proposedEquivalentPopulation,
  };

  // Linear brightness in units of the natural sky (natural = 1).
  const total = Math.pow(10, 0.4 * (naturalMag - measuredMag));
  const artificial = total - 1;
  if (!(artificial > 0)) {
    const reason =
      `The site is measured at ${measuredMag} mag/arcsec², no brighter than the natural reference ` +
      `${naturalMag}: there is no measured artificial brightness to scale the estimate from.`;
    return {
      ...common,
      warnings: [...warnings, reason],
      ok: false,
      reason,
      addedArtificialFraction: null,
      addedToNaturalRatio: null,
      newMag: null,
      deltaMag: null,
      percentBrighter: null,
      currentArtificialPercent: null,
      newArtificialPercent: null,
    };
  }

  const scale = artificial / existingWeight;
  const added = scale * walkerGlow(proposedEquivalentPopulation, proposed.distanceKm);
  const newTotal = total + added;
  const deltaMag = -2.5 * Math.log10(newTotal / total);
  return {
    ...common,
    ok: true,
    addedArtificialFraction: added / artificial,
    addedToNaturalRatio: added,
    newMag: measuredMag + deltaMag,
    deltaMag,
    percentBrighter: 100 * (newTotal / total - 1),
    currentArtificialPercent: 100 * artificial,
    newArtificialPercent: 100 * (artificial + added),
  };
}
