/**
 * A proposed development's added glow at every site within GLOW_SITE_RADIUS_KM, with Walker's law
 * scaled from each site's measured brightness (estimateAddedGlow in lib/glow.ts does the physics; this
 * module only decides which sites and which existing sources go into each estimate). Pure module.
 *
 * - A site's position is its centre: the mean of its approved stations' positions, else the mean of its
 *   boundary's vertices (a station is where the sky was measured).
 * - An existing source given by position counts for every site (distance to each site's centre); one
 *   given as a distance from a site counts for that site only.
 */
import type { GlowExistingSource, GlowProposed, GlowSiteResult } from "@/db/schema/briefs";
import { estimateAddedGlow, haversineKm, type LatLon } from "@/lib/glow";

export const GLOW_SITE_RADIUS_KM = 100;
/** Closer than this the development is at the site itself: Walker's law says nothing there. */
export const GLOW_MIN_DISTANCE_KM = 0.5;

export type GlowSite = { slug: string; name: string; centre: LatLon; measuredMag: number | null; measuredNights: number; naturalSkyMag: number };

export function sourcesForSite(site: GlowSite, sources: readonly GlowExistingSource[]): { name: string; population: number; distanceKm: number }[] {
  const out: { name: string; population: number; distanceKm: number }[] = [];
  for (const s of sources) {
    if (s.lat !== undefined && s.lon !== undefined) out.push({ name: s.name, population: s.population, distanceKm: haversineKm(site.centre, { lat: s.lat, lon: s.lon }) });
    else if (s.siteSlug === site.slug && s.distanceKm !== undefined) out.push({ name: s.name, population: s.population, distanceKm: s.distanceKm });
  }
  return out;
}

export function planGlow(input: { proposed: GlowProposed; sources: readonly GlowExistingSource[]; sites: readonly GlowSite[]; radiusKm?: number }): GlowSiteResult[] {
  const radius = input.radiusKm ?? GLOW_SITE_RADIUS_KM;
  const p = input.proposed;
  const results: GlowSiteResult[] = [];
  for (const site of input.sites) {
    const distanceKm = haversineKm(site.centre, { lat: p.lat, lon: p.lon });
    if (distanceKm > radius) continue;
    const sources = sourcesForSite(site, input.sources);
    const base = { siteSlug: site.slug, siteName: site.name, distanceKm, measuredMag: site.measuredMag, measuredNights: site.measuredNights, sources };
    const unavailable = (reason: string): GlowSiteResult => ({ ...base, ok: false, reason, deltaMag: null, percentBrighter: null, newMag: null, withinValidity: false, warnings: [] });
    if (site.measuredMag === null) {
      results.push(unavailable("No measured darkness yet: the site has no usable nights to scale from."));
      continue;
    }
    if (distanceKm < GLOW_MIN_DISTANCE_KM) {
      results.push(unavailable(`The development is within ${GLOW_MIN_DISTANCE_KM} km of the site's centre: Walker's law does not apply at the site itself.`));
      continue;
    }
    if (sources.length === 0) {
      results.push(unavailable("Add at least one known existing light source for this site: the measured glow is shared among them to set the scale."));
      continue;
    }
    try {
      const e = estimateAddedGlow({
        site: { measuredMag: site.measuredMag, naturalMag: site.naturalSkyMag },
        existingSources: sources.map((s) => ({ population: s.population, distanceKm: Math.max(s.distanceKm, 0.01) })),
        proposed: p.population !== undefined ? { population: p.population, distanceKm } : { lumens: p.lumens ?? 0, distanceKm },
      });
      results.push(
        e.ok
          ? { ...base, ok: true, reason: null, deltaMag: e.deltaMag, percentBrighter: e.percentBrighter, newMag: e.newMag, withinValidity: e.withinValidity, warnings: e.warnings }
          : { ...base, ok: false, reason: e.reason, deltaMag: null, percentBrighter: null, newMag: null, withinValidity: e.withinValidity, warnings: e.warnings },
      );
    } catch (err) {
      results.push(unavailable(err instanceof RangeError ? err.message : "The estimate could not be computed."));
    }
  }
  return results.sort((a, b) => a.distanceKm - b.distanceKm);
}
