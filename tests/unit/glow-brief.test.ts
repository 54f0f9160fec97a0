/**
 * Pure logic of hearing briefs and saved glow estimates beyond lib/glow.ts (whose Walker
 * proportionality is tested in glow.test.ts): the median's order-statistic interval, the base32
 * verification code, canonical JSON, and which sites and sources a glow estimate uses.
 */
import { describe, expect, it } from "vitest";
import { binomialHalfCdf, medianConfidenceInterval } from "@/lib/briefs/median-ci";
import { base32, canonicalJson, normaliseCode, sha256Hex, verificationFor } from "@/lib/briefs/verification";
import { estimateAddedGlow, haversineKm } from "@/lib/glow";
import { planGlow, type GlowSite } from "@/lib/glow-estimates/plan";

describe("order-statistic confidence interval for a median", () => {
  it("n = 20: [x(6), x(15)] with coverage 95.86 % (Conover 1999 §3.2; 1 − 2·P(Bin(20, ½) ≤ 5) = 0.958611 [calc])", () => {
    const ci = medianConfidenceInterval(Array.from({ length: 20 }, (_, i) => 20 - i))!; // any order
    expect(ci.k).toBe(6);
    expect(ci.lower).toBe(6);
    expect(ci.upper).toBe(15);
    expect(ci.coverage).toBeCloseTo(0.958611, 6);
  });
  it("P(Bin(10, ½) ≤ 1) = 11/1024 [calc]", () => {
    expect(binomialHalfCdf(10, 1)).toBeCloseTo(11 / 1024, 12);
  });
  it("n = 100: [x(40), x(61)] (the normal approximation 50 ∓ 1.96·5 gives 40.2 and 59.8 [calc])", () => {
    const ci = medianConfidenceInterval(Array.from({ length: 100 }, (_, i) => i + 1))!;
    expect([ci.lower, ci.upper]).toEqual([40, 61]);
    expect(ci.coverage).toBeGreaterThanOrEqual(0.95);
  });
  it("too few values: no interval", () => {
    expect(medianConfidenceInterval([1, 2, 3, 4, 5])).toBeNull();
  });
});

describe("verification codes", () => {
  it("base32 follows RFC 4648 §10 test vectors (without padding)", () => {
    const v: [string, string][] = [["", ""], ["f", "MY"], ["fo", "MZXQ"], ["foo", "MZXW6"], ["foob", "MZXW6YQ"], ["fooba", "MZXW6YTB"], ["foobar", "MZXW6YTBOI"]];
    for (const [input, out] of v) expect(base32(Buffer.from(input))).toBe(out);
  });
  it("canonical JSON sorts keys at every level, so key order does not change the code", () => {
    expect(canonicalJson({ b: 1, a: [2, { d: null, c: "x" }] })).toBe('{"a":[2,{"c":"x","d":null}],"b":1}');
    expect(verificationFor({ a: 1, b: { c: 2, d: 3 } }).code).toBe(verificationFor({ b: { d: 3, c: 2 }, a: 1 }).code);
  });
  it("the code is the first 10 base32 characters of the SHA-256 of the canonical JSON", () => {
    // FIPS 180-2 Appendix B.1: SHA-256("abc") [pub].
    expect(sha256Hex("abc")).toBe("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    const v = verificationFor({ x: 1 });
    expect(v.sha256).toBe(sha256Hex('{"x":1}'));
    expect(v.code).toBe(base32(Buffer.from(v.sha256, "hex")).slice(0, 10));
    expect(v.code).toMatch(/^[A-Z2-7]{10}$/);
    expect(verificationFor({ x: 1 }).code).not.toBe(verificationFor({ x: 2 }).code);
  });
  it("codes typed by people: case and dashes ignored", () => {
    expect(normaliseCode("wqjj-s4yh c2")).toBe("WQJJS4YHC2");
    expect(normaliseCode("WQJJS4YHC1")).toBeNull(); // 1 is not in the base32 alphabet
  });
});

describe("planGlow: which sites and sources a glow estimate uses", () => {
  const near: GlowSite = { slug: "near", name: "Near", centre: { lat: 37.9, lon: -111.4 }, measuredMag: 21.5, measuredNights: 30, naturalSkyMag: 22 };
  const far: GlowSite = { slug: "far", name: "Far", centre: { lat: 40.6, lon: -122.0 }, measuredMag: 20.8, measuredNights: 30, naturalSkyMag: 22 };
  const proposed = { lat: 37.9, lon: -111.1, population: 5000 };
  const town = { name: "Town", population: 20000, lat: 37.9, lon: -111.7 };

  it("only sites within 100 km are estimated", () => {
    const r = planGlow({ proposed, sources: [town], sites: [near, far] });
    expect(r.map((x) => x.siteSlug)).toEqual(["near"]);
  });

  it("the result is lib/glow.ts estimateAddedGlow with the great-circle distances", () => {
    const [r] = planGlow({ proposed, sources: [town], sites: [near] });
    const e = estimateAddedGlow({
      site: { measuredMag: 21.5, naturalMag: 22 },
      existingSources: [{ population: 20000, distanceKm: haversineKm(near.centre, town) }],
      proposed: { population: 5000, distanceKm: haversineKm(near.centre, proposed) },
    });
    expect(e.ok).toBe(true);
    expect(r!.deltaMag).toBeCloseTo(e.deltaMag!, 12);
    expect(r!.percentBrighter).toBeCloseTo(e.percentBrighter!, 12);
  });

  it("a source given as a distance counts only for its site; no source means no estimate, with a reason", () => {
    const other: GlowSite = { ...near, slug: "other", name: "Other", centre: { lat: 38.0, lon: -111.3 } };
    const r = planGlow({ proposed, sources: [{ name: "Village", population: 3000, siteSlug: "near", distanceKm: 20 }], sites: [near, other] });
    const n = r.find((x) => x.siteSlug === "near")!;
    const o = r.find((x) => x.siteSlug === "other")!;
    expect(n.ok).toBe(true);
    expect(n.sources).toEqual([{ name: "Village", population: 3000, distanceKm: 20 }]);
    expect(o.ok).toBe(false);
    expect(o.reason).toMatch(/existing light source/);
  });

  it("distances outside Walker's 10–50 km are flagged, not hidden", () => {
    const [r] = planGlow({ proposed: { lat: 37.9, lon: -111.35, population: 5000 }, sources: [town], sites: [near] }); // ~4.4 km
    expect(r!.ok).toBe(true);
    expect(r!.withinValidity).toBe(false);
  });

  it("a site without measured darkness gets a reason, not a number", () => {
    const [r] = planGlow({ proposed, sources: [town], sites: [{ ...near, measuredMag: null, measuredNights: 0 }] });
    expect(r!.ok).toBe(false);
    expect(r!.deltaMag).toBeNull();
  });
});
