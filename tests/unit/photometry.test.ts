import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  FALCHI_2016_K,
  LUMINANCE_K_CD_M2,
  NATURAL_SKY_MAG,
  POGSON_RATIO,
  artificialPercent,
  atlasClass,
  atlasClassLimitsMag,
  bortleApprox,
  brighteningPercentPerYear,
  convertAll,
  luminanceCdM2ToMag,
  magDiffToRatio,
  magFromNelm,
  magToLuminanceCdM2,
  magToMcdM2,
  magToUcdM2,
  nelmFromMag,
  percentPerYearFromSlope,
  ratioToMagDiff,
  ratioToNatural,
  slopeMagPerYearFromBrighteningPercent,
} from "../../lib/photometry";

/** |actual − expected| ≤ rel·|expected| */
function expectRel(actual: number, expected: number, rel: number) {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(rel * Math.abs(expected));
}

describe("constants", () => {
  it("K values and natural sky", () => {
    expect(LUMINANCE_K_CD_M2).toBe(1.08e5); // Allen's Astrophysical Quantities (Cox 2000) via DOMAIN.md [mem/calc]
    expect(FALCHI_2016_K).toBe(1.098e5); // Falchi et al. 2016: 22.0 mag/arcsec² = 174 µcd/m² [pub]
    expect(NATURAL_SKY_MAG).toBe(22.0); // Falchi et al. 2016 [pub]
    expect(POGSON_RATIO).toBeCloseTo(2.511886, 6); // DOMAIN.md Pogson ratio [calc]
  });

  it("Falchi's K is implied by 174 µcd/m² at 22.0", () => {
    // Falchi et al. 2016 [pub]: 174 µcd/m² at 22.0 mag/arcsec²
    expectRel(magToUcdM2(22.0, FALCHI_2016_K), 174, 0.001);
  });
});

describe("magnitude ⇄ luminance (K = 1.08e5)", () => {
  // DOMAIN.md worked values [calc], µcd/m²
  const worked: [number, number][] = [
    [22.0, 171.2],
    [21.5, 271.3],
    [21.0, 430.0],
    [20.0, 1080],
    [18.0, 6814],
    [16.0, 42996],
  ];
  it.each(worked)("%s mag/arcsec² → %s µcd/m² (DOMAIN.md worked value [calc])", (mag, ucd) => {
    expectRel(magToUcdM2(mag), ucd, 5e-4);
    expectRel(magToMcdM2(mag), ucd / 1e3, 5e-4);
    expectRel(magToLuminanceCdM2(mag), ucd / 1e6, 5e-4);
  });

  it("22.0 is within ±2 % of Falchi et al. 2016's 174 µcd/m² [pub]", () => {
    expectRel(magToUcdM2(22.0), 174, 0.02);
  });

  it("inverse of the worked values", () => {
    expect(luminanceCdM2ToMag(171.2e-6)).toBeCloseTo(22.0, 2); // DOMAIN.md [calc]
    expect(luminanceCdM2ToMag(1080e-6)).toBeCloseTo(20.0, 3); // DOMAIN.md [calc]
    expect(luminanceCdM2ToMag(174e-6, FALCHI_2016_K)).toBeCloseTo(22.0, 2); // Falchi et al. 2016 [pub]
  });

  it("round trip (property)", () => {
    fc.assert(
      fc.property(fc.double({ min: 5, max: 25, noNaN: true }), (m) => {
        expect(luminanceCdM2ToMag(magToLuminanceCdM2(m))).toBeCloseTo(m, 9);
        expect(luminanceCdM2ToMag(magToLuminanceCdM2(m, FALCHI_2016_K), FALCHI_2016_K)).toBeCloseTo(
          m,
          9,
        );
      }),
    );
  });

  it("rejects invalid input with RangeError", () => {
    expect(() => magToLuminanceCdM2(Number.NaN)).toThrow(RangeError);
    expect(() => magToLuminanceCdM2(Infinity)).toThrow(RangeError);
    expect(() => magToLuminanceCdM2(21, 0)).toThrow(RangeError);
    expect(() => luminanceCdM2ToMag(0)).toThrow(RangeError);
    expect(() => luminanceCdM2ToMag(-1)).toThrow(/greater than zero/);
    expect(() => magToLuminanceCdM2("21" as unknown as number)).toThrow(/finite number/);
  });
});

describe("Pogson ratios", () => {
  // DOMAIN.md [calc]: 0.1 mag = ×1.0965, 1 mag = ×2.512, 2.5 mag = ×10, 5 mag = ×100
  it("magnitude difference → ratio", () => {
    expect(magDiffToRatio(0.1)).toBeCloseTo(1.0965, 4); // DOMAIN.md [calc]
    expect(magDiffToRatio(1)).toBeCloseTo(2.511886, 6); // DOMAIN.md [calc]
    expect(magDiffToRatio(2.5)).toBeCloseTo(10, 12); // DOMAIN.md [calc]
    expect(magDiffToRatio(5)).toBeCloseTo(100, 10); // DOMAIN.md [calc]; common practice: 5 mag = ×100
    expect(magDiffToRatio(0)).toBe(1);
  });

  it("ratio → magnitude difference", () => {
    expect(ratioToMagDiff(100)).toBeCloseTo(5, 12); // DOMAIN.md [calc]
    expect(ratioToMagDiff(10)).toBeCloseTo(2.5, 12); // DOMAIN.md [calc]
    expect(ratioToMagDiff(2.511886)).toBeCloseTo(1, 6); // DOMAIN.md [calc]
    expect(() => ratioToMagDiff(0)).toThrow(RangeError);
  });

  it("round trip (property)", () => {
    fc.assert(
      fc.property(fc.double({ min: -20, max: 20, noNaN: true }), (dm) => {
        expect(ratioToMagDiff(magDiffToRatio(dm))).toBeCloseTo(dm, 9);
      }),
    );
  });

  it("ratio to natural and artificial %", () => {
    expect(ratioToNatural(22.0)).toBe(1);
    expect(ratioToNatural(17.0)).toBeCloseTo(100, 9); // 5 mag = ×100, DOMAIN.md [calc]
    expect(ratioToNatural(21.0)).toBeCloseTo(2.511886, 6); // DOMAIN.md [calc]
    expect(artificialPercent(21.0)).toBeCloseTo(151.1886, 4); // 100·(2.511886 − 1) [calc]
    expect(artificialPercent(22.0)).toBe(0);
    expect(artificialPercent(22.3)).toBe(0); // darker than natural: clamped
    expect(artificialPercent(21.0, 21.0)).toBe(0); // configurable natural reference
  });
});

describe("naked-eye limiting magnitude", () => {
  // DOMAIN.md worked values from the Schaefer 1990 / Garstang 1986 closed form [calc]
  const worked: [number, number][] = [
    [22, 6.63],
    [21.5, 6.38],
    [21, 6.12],
    [20, 5.49],
    [19, 4.77],
    [18, 3.97],
    [17, 3.1],
    [16, 2.19],
  ];
  // DOMAIN.md prints two decimals; its 6.63 for m = 22 is 6.6247 by the same formula (see below),
  // so the table is checked to ±0.01.
  it.each(worked)("m = %s → NELM %s (DOMAIN.md [calc])", (m, nelm) => {
    expect(Math.abs(nelmFromMag(m) - nelm)).toBeLessThanOrEqual(0.01);
  });

  it("closed form evaluated directly [calc]", () => {
    // 7.93 − 5·log₁₀(1 + 10^(4.316 − 22/5)) = 6.62474… [calc]
    expect(nelmFromMag(22)).toBeCloseTo(7.93 - 5 * Math.log10(1 + Math.pow(10, 4.316 - 4.4)), 12);
    expect(nelmFromMag(22)).toBeCloseTo(6.6247, 4); // [calc]
  });

  it("about magnitude 6 under a dark rural sky (common practice)", () => {
    // ~21.8 mag/arcsec² at dark rural sites: DOMAIN.md [pub, Posch et al. 2018]; "about 6": common practice
    expect(Math.abs(nelmFromMag(21.8) - 6)).toBeLessThan(0.75);
  });

  it("inverse", () => {
    expect(magFromNelm(nelmFromMag(21.0))).toBeCloseTo(21.0, 9);
    expect(magFromNelm(6.63)).toBeCloseTo(22, 1); // DOMAIN.md [calc]
    fc.assert(
      fc.property(fc.double({ min: 10, max: 24, noNaN: true }), (m) => {
        expect(magFromNelm(nelmFromMag(m))).toBeCloseTo(m, 7);
      }),
    );
  });

  it("inverse is undefined at and above 7.93", () => {
    expect(() => magFromNelm(7.93)).toThrow(RangeError);
    expect(() => magFromNelm(8.5)).toThrow(/below 7.93/);
    expect(() => magFromNelm(Number.NaN)).toThrow(RangeError);
  });
});

describe("Bortle class (approximate)", () => {
  // Ranges commonly quoted for Bortle 2001 (Sky & Telescope) — not in the article, from memory [mem]
  const cases: [number, number, string][] = [
    [22.1, 1, "1"],
    [21.99, 1, "1"],
    [21.95, 2, "2"],
    [21.89, 2, "2"],
    [21.8, 3, "3"],
    [21.69, 3, "3"],
    [21.0, 4, "4"],
    [20.49, 4, "4"],
    [20.0, 5, "5"],
    [19.5, 5, "5"],
    [19.2, 6, "6"],
    [18.94, 6, "6"],
    [18.6, 7, "7"],
    [18.38, 7, "7"],
    [18.37, 8, "8–9"],
    [15.0, 8, "8–9"],
  ];
  it.each(cases)("%s mag/arcsec² → class %s (commonly quoted ranges [mem])", (mag, cls, label) => {
    const b = bortleApprox(mag);
    expect(b.class).toBe(cls);
    expect(b.label).toBe(label);
    expect(b.approximate).toBe(true);
  });

  it("rejects non-finite input", () => {
    expect(() => bortleApprox(Number.NaN)).toThrow(RangeError);
  });
});

describe("Falchi et al. 2016 atlas classes", () => {
  // Class limits as total brightness on a 22.0 base: DOMAIN.md [calc]
  const limits = [21.989, 21.916, 21.56, 20.26, 18.85];

  it("limits in mag/arcsec² match DOMAIN.md [calc]", () => {
    const got = atlasClassLimitsMag(22);
    got.forEach((g, i) => expect(Math.abs(g - (limits[i] as number))).toBeLessThanOrEqual(0.005));
  });

  it.each(limits.map((l, i) => [l, i + 1] as const))(
    "limit %s mag/arcsec² separates class %s from the next (DOMAIN.md [calc])",
    (limit, cls) => {
      expect(atlasClass(limit + 0.006).class).toBe(cls);
      expect(atlasClass(limit - 0.006).class).toBe(cls + 1);
    },
  );

  it("1 %, 8 % and 50 % artificial (Falchi et al. 2016 [pub])", () => {
    const at = (fraction: number) => 22 - 2.5 * Math.log10(1 + fraction);
    expect(atlasClass(at(0.01)).class).toBe(1); // ≤ 1 % is pristine
    expect(atlasClass(at(0.0101)).class).toBe(2);
    expect(atlasClass(at(0.0799)).class).toBe(2);
    expect(atlasClass(at(0.0801)).class).toBe(3);
    expect(atlasClass(at(0.4999)).class).toBe(3);
    expect(atlasClass(at(0.5001)).class).toBe(4);
    expect(atlasClass(22.5).class).toBe(1);
    expect(atlasClass(15).class).toBe(6);
    expect(atlasClass(21.56).artificialRatio).toBeCloseTo(0.5, 3);
  });

  it("uses the natural reference", () => {
    expect(atlasClass(21.5, 21.5).class).toBe(1);
  });
});

describe("trend slope → % brighter per year", () => {
  it("Kyba et al. 2023: −0.0995 mag/arcsec²/yr ≈ +9.6 %/yr [calc from pub]", () => {
    expect(brighteningPercentPerYear(-0.0995)).toBeCloseTo(9.6, 1);
    expect(percentPerYearFromSlope(-0.0995)).toBeCloseTo(9.6, 1);
  });

  it("sign: a positive slope (darkening) is negative brightening", () => {
    expect(brighteningPercentPerYear(0)).toBe(0);
    expect(brighteningPercentPerYear(0.1)).toBeLessThan(0);
    expect(brighteningPercentPerYear(-1)).toBeCloseTo(151.1886, 3); // 1 mag = ×2.512, DOMAIN.md [calc]
  });

  it("Puschnig et al. 2023 rates round-trip [pub]", () => {
    for (const pct of [1.7, 3.7, 9.6]) {
      expect(brighteningPercentPerYear(slopeMagPerYearFromBrighteningPercent(pct))).toBeCloseTo(
        pct,
        10,
      );
    }
    expect(slopeMagPerYearFromBrighteningPercent(9.6)).toBeCloseTo(-0.0995, 4); // DOMAIN.md [calc]
  });
});

describe("convertAll", () => {
  it("returns every conversion with sourced constants", () => {
    const r = convertAll(21.0);
    expectRel(r.luminanceCdM2, 430.0e-6, 5e-4); // DOMAIN.md [calc]
    expectRel(r.luminanceMcdM2, 0.43, 5e-4); // DOMAIN.md [calc]
    expect(r.ratioToNatural).toBeCloseTo(2.511886, 6); // DOMAIN.md [calc]
    expect(r.artificialPercent).toBeCloseTo(151.19, 2);
    expect(r.nelm).toBeCloseTo(6.12, 2); // DOMAIN.md [calc]
    expect(r.bortleApprox).toEqual({ class: 4, label: "4", approximate: true });
    expect(r.constants.luminanceK.value).toBe(LUMINANCE_K_CD_M2);
    expect(r.constants.luminanceK.source).toMatch(/Allen/);
    expect(r.constants.falchi2016K.source).toMatch(/Falchi/);
    expect(r.constants.naturalSkyMag.value).toBe(22);
    expect(JSON.parse(JSON.stringify(r))).toEqual(r); // serialisable as an API body
  });

  it("honours options and validates them", () => {
    const r = convertAll(22.0, { k: FALCHI_2016_K, naturalMag: 21.8 });
    expectRel(r.luminanceUcdM2, 174, 0.001); // Falchi et al. 2016 [pub]
    expect(r.artificialPercent).toBe(0);
    expect(r.constants.luminanceK.source).toBe("caller-supplied");
    expect(() => convertAll(Number.NaN)).toThrow(RangeError);
    expect(() => convertAll(21, { k: -1 })).toThrow(RangeError);
    expect(() => convertAll(21, { naturalMag: Infinity })).toThrow(RangeError);
  });
});
