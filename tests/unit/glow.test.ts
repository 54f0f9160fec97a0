import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  ASSUMED_LUMENS_PER_PERSON,
  EARTH_MEAN_RADIUS_KM,
  GLOW_ESTIMATE_CAUTION,
  estimateAddedGlow,
  haversineKm,
  walkerGlow,
  type GlowEstimateInput,
  type GlowEstimateOk,
} from "../../lib/glow";

const baseInput = (proposed: GlowEstimateInput["proposed"]): GlowEstimateInput => ({
  site: { measuredMag: 21.0 },
  existingSources: [
    { population: 100_000, distanceKm: 30 },
    { population: 20_000, distanceKm: 15 },
  ],
  proposed,
});

function ok(input: GlowEstimateInput): GlowEstimateOk {
  const r = estimateAddedGlow(input);
  if (!r.ok) throw new Error(`expected an estimate, got: ${r.reason}`);
  return r;
}

describe("Walker's law (Walker 1977, PASP 89:405 — proportionality only, details [mem])", () => {
  it("population × distance^−2.5", () => {
    expect(walkerGlow(1000, 10)).toBeCloseTo(1000 * Math.pow(10, -2.5), 12);
    expect(walkerGlow(0, 20)).toBe(0);
  });

  it("doubling the distance divides the glow by 2^2.5 = 5.657 [calc]", () => {
    expect(walkerGlow(5000, 12) / walkerGlow(5000, 24)).toBeCloseTo(5.656854, 6);
    fc.assert(
      fc.property(
        fc.double({ min: 1, max: 1e7, noNaN: true }),
        fc.double({ min: 0.5, max: 200, noNaN: true }),
        (pop, d) => {
          expect(walkerGlow(pop, d) / walkerGlow(pop, 2 * d)).toBeCloseTo(Math.pow(2, 2.5), 9);
          expect(walkerGlow(2 * pop, d) / walkerGlow(pop, d)).toBeCloseTo(2, 12);
        },
      ),
    );
  });

  it("rejects bad input", () => {
    expect(() => walkerGlow(100, 0)).toThrow(RangeError);
    expect(() => walkerGlow(-1, 10)).toThrow(RangeError);
    expect(() => walkerGlow(100, Number.NaN)).toThrow(RangeError);
  });
});

describe("estimateAddedGlow", () => {
  it("doubling the proposed distance divides the added glow by 2^2.5 [calc]", () => {
    const near = ok(baseInput({ population: 5000, distanceKm: 12 }));
    const far = ok(baseInput({ population: 5000, distanceKm: 24 }));
    expect(near.addedArtificialFraction / far.addedArtificialFraction).toBeCloseTo(5.656854, 6);
    expect(near.addedToNaturalRatio / far.addedToNaturalRatio).toBeCloseTo(5.656854, 6);
  });

  it("doubling the proposed population doubles the added glow", () => {
    const a = ok(baseInput({ population: 5000, distanceKm: 20 }));
    const b = ok(baseInput({ population: 10_000, distanceKm: 20 }));
    expect(b.addedArtificialFraction / a.addedArtificialFraction).toBeCloseTo(2, 12);
    expect(b.percentBrighter / a.percentBrighter).toBeCloseTo(2, 12);
  });

  it("a zero-size proposal adds zero", () => {
    const r = ok(baseInput({ population: 0, distanceKm: 20 }));
    expect(r.addedArtificialFraction).toBe(0);
    expect(r.percentBrighter).toBe(0);
    expect(r.deltaMag === 0).toBe(true); // may be −0
    expect(r.newMag).toBe(21.0);
  });

  it("deltaMag follows Pogson: −2.5·log₁₀(1 + %brighter/100)", () => {
    const r = ok(baseInput({ population: 50_000, distanceKm: 15 }));
    expect(r.deltaMag).toBeLessThan(0);
    expect(r.deltaMag).toBeCloseTo(-2.5 * Math.log10(1 + r.percentBrighter / 100), 12);
    expect(r.newMag).toBeCloseTo(21.0 + r.deltaMag, 12);
  });

  it("scales from the measured artificial brightness (worked example [calc])", () => {
    // 21.0 on a 22.0 natural base: total = 10^0.4 = 2.511886 × natural, artificial = 1.511886.
    // One existing town of 10,000 at 20 km; a new one of 10,000 at 20 km doubles the artificial part.
    const r = ok({
      site: { measuredMag: 21.0 },
      existingSources: [{ population: 10_000, distanceKm: 20 }],
      proposed: { population: 10_000, distanceKm: 20 },
    });
    expect(r.addedArtificialFraction).toBeCloseTo(1, 12);
    expect(r.currentArtificialPercent).toBeCloseTo(151.1886, 3);
    expect(r.newArtificialPercent).toBeCloseTo(302.3773, 3);
    // new total = 1 + 2·1.511886 = 4.023773 → 22 − 2.5·log₁₀(4.023773) = 20.4884 [calc]
    expect(r.newMag).toBeCloseTo(20.4884, 4);
    expect(r.percentBrighter).toBeCloseTo(60.189, 2);
    expect(r.withinValidity).toBe(true);
  });

  it("the result does not depend on the natural reference's absolute scale, only the ratio", () => {
    const a = ok({
      ...baseInput({ population: 5000, distanceKm: 20 }),
      site: { measuredMag: 21, naturalMag: 22 },
    });
    const b = ok({
      ...baseInput({ population: 5000, distanceKm: 20 }),
      site: { measuredMag: 20, naturalMag: 21 },
    });
    expect(b.percentBrighter).toBeCloseTo(a.percentBrighter, 10);
    expect(b.deltaMag).toBeCloseTo(a.deltaMag, 10);
  });

  it("lumens convert with the stated per-person assumption", () => {
    expect(ASSUMED_LUMENS_PER_PERSON).toBe(1000); // an assumption of this product, not a published figure
    const byPop = ok(baseInput({ population: 2000, distanceKm: 20 }));
    const byLumens = estimateAddedGlow(baseInput({ lumens: 2_000_000, distanceKm: 20 }));
    expect(byLumens.ok).toBe(true);
    expect(byLumens.proposedEquivalentPopulation).toBe(2000);
    expect(byLumens.addedArtificialFraction).toBeCloseTo(byPop.addedArtificialFraction, 12);
    expect(byLumens.warnings.join(" ")).toMatch(/assum/);
    const custom = estimateAddedGlow({
      ...baseInput({ lumens: 2_000_000, distanceKm: 20 }),
      lumensPerPerson: 500,
    });
    expect(custom.proposedEquivalentPopulation).toBe(4000);
  });

  it("flags distances outside Walker's 10–50 km", () => {
    const r = estimateAddedGlow(baseInput({ population: 5000, distanceKm: 5 }));
    expect(r.withinValidity).toBe(false);
    expect(r.warnings.some((w) => /5 km/.test(w) && /10–50 km/.test(w))).toBe(true);
    const r2 = estimateAddedGlow({
      site: { measuredMag: 21 },
      existingSources: [{ population: 1e6, distanceKm: 80 }],
      proposed: { population: 100, distanceKm: 20 },
    });
    expect(r2.withinValidity).toBe(false);
    expect(r2.caution).toBe(GLOW_ESTIMATE_CAUTION);
  });

  it("cannot scale from a site measured at or darker than natural", () => {
    for (const measuredMag of [22.0, 22.2]) {
      const r = estimateAddedGlow({
        ...baseInput({ population: 5000, distanceKm: 20 }),
        site: { measuredMag },
      });
      expect(r.ok).toBe(false);
      if (!r.ok) {
        expect(r.reason).toMatch(/no measured artificial brightness/);
        expect(r.newMag).toBeNull();
        expect(r.deltaMag).toBeNull();
        expect(r.percentBrighter).toBeNull();
        expect(r.addedArtificialFraction).toBeNull();
      }
    }
  });

  it("refuses invalid input with RangeError", () => {
    expect(() => estimateAddedGlow(baseInput({ population: 5000, distanceKm: 0 }))).toThrow(
      RangeError,
    );
    expect(() => estimateAddedGlow(baseInput({ population: -5, distanceKm: 20 }))).toThrow(
      RangeError,
    );
    expect(() => estimateAddedGlow(baseInput({ distanceKm: 20 }))).toThrow(
      /population or the added lumens/,
    );
    expect(() =>
      estimateAddedGlow(baseInput({ population: 1, lumens: 1, distanceKm: 20 })),
    ).toThrow(/not both/);
    expect(() =>
      estimateAddedGlow({
        ...baseInput({ population: 5000, distanceKm: 20 }),
        existingSources: [],
      }),
    ).toThrow(/at least one existing/);
    expect(() =>
      estimateAddedGlow({
        ...baseInput({ population: 5000, distanceKm: 20 }),
        existingSources: [{ population: 0, distanceKm: 20 }],
      }),
    ).toThrow(/population must be greater than zero/);
    expect(() =>
      estimateAddedGlow({
        ...baseInput({ population: 5000, distanceKm: 20 }),
        existingSources: [{ population: 100, distanceKm: -3 }],
      }),
    ).toThrow(/distanceKm must be greater than zero/);
    expect(() =>
      estimateAddedGlow({
        ...baseInput({ population: 5000, distanceKm: 20 }),
        site: { measuredMag: Number.NaN },
      }),
    ).toThrow(RangeError);
  });
});

describe("haversineKm", () => {
  it("one degree of latitude = π·R/180 [calc]", () => {
    expect(haversineKm({ lat: 0, lon: 0 }, { lat: 1, lon: 0 })).toBeCloseTo(
      (Math.PI * EARTH_MEAN_RADIUS_KM) / 180,
      9,
    );
    expect(haversineKm({ lat: 0, lon: 0 }, { lat: 1, lon: 0 })).toBeCloseTo(111.195, 2); // R = 6371.0088 km [mem]
  });
  it("quarter of the equator and antipodes [calc]", () => {
    expect(haversineKm({ lat: 0, lon: 0 }, { lat: 0, lon: 90 })).toBeCloseTo(
      (Math.PI * EARTH_MEAN_RADIUS_KM) / 2,
      6,
    );
    expect(haversineKm({ lat: 10, lon: 20 }, { lat: -10, lon: -160 })).toBeCloseTo(
      Math.PI * EARTH_MEAN_RADIUS_KM,
      6,
    );
  });
  it("symmetric and zero on the same point (property)", () => {
    const pos = fc.record({
      lat: fc.double({ min: -90, max: 90, noNaN: true }),
      lon: fc.double({ min: -180, max: 180, noNaN: true }),
    });
    fc.assert(
      fc.property(pos, pos, (a, b) => {
        expect(haversineKm(a, b)).toBeCloseTo(haversineKm(b, a), 9);
        expect(haversineKm(a, a)).toBe(0);
      }),
    );
  });
  it("rejects impossible coordinates", () => {
    expect(() => haversineKm({ lat: 91, lon: 0 }, { lat: 0, lon: 0 })).toThrow(RangeError);
    expect(() => haversineKm({ lat: 0, lon: 0 }, { lat: 0, lon: 181 })).toThrow(RangeError);
    expect(() => haversineKm({ lat: Number.NaN, lon: 0 }, { lat: 0, lon: 0 })).toThrow(RangeError);
  });
});
