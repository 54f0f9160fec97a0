import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  enoughForTrend,
  erfc,
  mannKendall,
  normalCdf,
  normalQuantile,
  normalSf,
  seasonalKendall,
  theilSen,
  twoSidedP,
  type SeasonalPoint,
} from "../../lib/stats/trend";
import {
  iqr,
  mad,
  median,
  quantile,
  runningMedian,
  MAD_NORMAL_CONSISTENCY,
} from "../../lib/stats/robust";

function expectRel(actual: number, expected: number, rel: number) {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(rel * Math.abs(expected));
}

// Test vector A — USEPA 2009 Unified Guidance, Example 17-6 [pub] (via DOMAIN.md)
const A_X = [
  89.6, 89.8, 90.1, 90.3, 90.6, 90.8, 91.1, 91.3, 91.6, 91.8, 92.1, 92.6, 93.1, 93.6, 94.1, 94.6,
  95.1, 95.6, 95.8, 96.1, 96.3, 96.6, 96.8,
];
const A_Y = [
  480, 450, 490, 520, 485, 510, 510, 530, 510, 560, 560, 540, 590, 550, 600, 700, 570, 610, 650,
  620, 830, 720, 590,
];

// Test vector B — USEPA 2009 Unified Guidance, Example 14-10 [pub] (via DOMAIN.md); seasons = months
const B_ROWS: [number, number[]][] = [
  [1983, [1.99, 2.1, 2.12, 2.12, 2.11, 2.15, 2.19, 2.18, 2.16, 2.08, 2.05, 2.08]],
  [1984, [2.01, 2.1, 2.17, 2.13, 2.13, 2.18, 2.25, 2.24, 2.22, 2.13, 2.08, 2.16]],
  [1985, [2.15, 2.17, 2.27, 2.23, 2.24, 2.26, 2.31, 2.32, 2.28, 2.22, 2.19, 2.22]],
];
const B_POINTS: SeasonalPoint[] = B_ROWS.flatMap(([year, months]) =>
  months.map((y, m) => ({ season: m + 1, x: year, y })),
);

describe("normal distribution", () => {
  it("CDF against standard table values (from memory [mem])", () => {
    expect(normalCdf(0)).toBe(0.5);
    expect(Math.abs(normalCdf(1) - 0.8413447460685429)).toBeLessThan(1e-12); // [mem]
    expect(Math.abs(normalCdf(-1) - 0.15865525393145707)).toBeLessThan(1e-12); // [mem]
    expect(Math.abs(normalCdf(1.96) - 0.9750021048517795)).toBeLessThan(1e-12); // [mem]
    expect(Math.abs(normalCdf(-3) - 0.0013498980316301)).toBeLessThan(1e-12); // [mem]
    expectRel(normalCdf(-8), 6.22096057427178e-16, 1e-9); // [mem]
    expect(normalCdf(-40)).toBe(0);
    expect(normalCdf(40)).toBe(1);
  });

  it("symmetry and tails (property)", () => {
    fc.assert(
      fc.property(fc.double({ min: -10, max: 10, noNaN: true }), (z) => {
        expect(Math.abs(normalCdf(z) + normalCdf(-z) - 1)).toBeLessThan(1e-15);
        expect(Math.abs(normalSf(z) - normalCdf(-z))).toBeLessThan(1e-15);
        expect(Math.abs(erfc(z / Math.SQRT2) - 2 * normalSf(z))).toBeLessThan(1e-15);
      }),
    );
  });

  it("CDF is smooth across the series / continued-fraction switch (x = 3, z ≈ 4.243)", () => {
    const z = 3 * Math.SQRT2;
    const lo = normalSf(z - 1e-9);
    const hi = normalSf(z + 1e-9);
    expect(lo).toBeGreaterThan(hi);
    expectRel(lo, hi, 1e-7);
  });

  it("quantile", () => {
    expect(normalQuantile(0.975)).toBeCloseTo(1.959963984540054, 10); // common practice: z₀.₉₇₅ = 1.96 [mem]
    expect(normalQuantile(0.5)).toBeCloseTo(0, 12);
    fc.assert(
      fc.property(fc.double({ min: 1e-12, max: 1 - 1e-12, noNaN: true }), (p) => {
        expect(Math.abs(normalCdf(normalQuantile(p)) - p)).toBeLessThan(1e-12);
      }),
    );
    expect(() => normalQuantile(0)).toThrow(RangeError);
    expect(() => normalQuantile(1)).toThrow(RangeError);
  });
});

describe("Mann–Kendall — USEPA 2009 Unified Guidance, Example 17-6 (test vector A)", () => {
  const r = mannKendall(A_Y);
  it("n, S, Var(S)", () => {
    expect(r.n).toBe(23); // USEPA 2009 Ex. 17-6 [pub]
    expect(r.s).toBe(194); // USEPA 2009 Ex. 17-6 [pub]
    expect(r.varS).toBeCloseTo(1428, 9); // USEPA 2009 Ex. 17-6 [pub]
  });
  it("Z and two-sided p", () => {
    expect(r.z).toBeCloseTo(5.107322, 6); // USEPA 2009 Ex. 17-6 [pub]
    expectRel(r.p, 3.267574e-7, 1e-6); // USEPA 2009 Ex. 17-6 [pub]
    expect(r.tau).toBeCloseTo(194 / 253, 12); // tau-a = S / (n(n−1)/2) [calc]
  });
});

describe("Theil–Sen — USEPA 2009 Unified Guidance, Example 17-6 (test vector A)", () => {
  const r = theilSen(A_X, A_Y);
  it("slope", () => {
    expect(r.slope).toBeCloseTo(26.6667, 4); // USEPA 2009 Ex. 17-6 [pub]
    expect(r.pairs).toBe(253);
    expect(r.sampled).toBe(false);
  });
  it("confidence interval brackets the slope and widens with confidence", () => {
    expect(r.lower).toBeLessThan(r.slope);
    expect(r.upper).toBeGreaterThan(r.slope);
    const r99 = theilSen(A_X, A_Y, 0.01);
    expect(r99.lower).toBeLessThanOrEqual(r.lower);
    expect(r99.upper).toBeGreaterThanOrEqual(r.upper);
  });
  it("intercept is the median of y − slope·x", () => {
    const res = A_Y.map((y, i) => y - r.slope * (A_X[i] as number));
    expect(r.intercept).toBeCloseTo(median(res), 9);
  });
});

describe("seasonal Kendall — USEPA 2009 Unified Guidance, Example 14-10 (test vector B)", () => {
  const r = seasonalKendall(B_POINTS);
  it("S, Var, Z, p", () => {
    expect(r.s).toBe(35); // USEPA 2009 Ex. 14-10 [pub]
    expect(r.varS).toBe(43); // USEPA 2009 Ex. 14-10 [pub]
    expect(r.z).toBeCloseTo(5.184951, 6); // USEPA 2009 Ex. 14-10 [pub]
    expectRel(r.p, 2.160712e-7, 1e-6); // USEPA 2009 Ex. 14-10 [pub]
  });
  it("seasonal Sen slope", () => {
    expect(r.slope).toBeCloseTo(0.06, 9); // USEPA 2009 Ex. 14-10 [pub], per year
  });
  it("per-season breakdown", () => {
    expect(r.seasons).toHaveLength(12);
    const feb = r.seasons.find((s) => s.season === 2);
    expect(feb).toEqual({ season: 2, n: 3, s: 2, varS: 48 / 18 }); // tie 2.10, 2.10 [calc]
  });
  it("ordering within a season is by x, not input order", () => {
    const shuffled = [...B_POINTS].reverse();
    const r2 = seasonalKendall(shuffled);
    expect(r2.s).toBe(35);
    expect(r2.slope).toBeCloseTo(0.06, 9);
  });
  it("string seasons work", () => {
    const named = B_POINTS.map((p) => ({ ...p, season: `m${p.season}` }));
    expect(seasonalKendall(named).s).toBe(35);
  });
});

describe("trend properties", () => {
  it("strictly increasing series has S = n(n−1)/2", () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: 0.001, max: 10, noNaN: true }), { minLength: 3, maxLength: 60 }),
        (steps) => {
          let acc = 0;
          const values = steps.map((s) => (acc += s));
          const n = values.length;
          const r = mannKendall(values);
          expect(r.s).toBe((n * (n - 1)) / 2);
          expect(r.tau).toBe(1);
        },
      ),
    );
  });

  it("reversing the series flips the sign of S and Z", () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: -5, max: 5 }), { minLength: 3, maxLength: 50 }),
        (values) => {
          const a = mannKendall(values);
          const b = mannKendall([...values].reverse());
          expect(b.s + a.s).toBe(0);
          expect(b.varS).toBe(a.varS);
          expect(b.z).toBeCloseTo(-a.z, 12);
          expect(b.p).toBeCloseTo(a.p, 12);
        },
      ),
    );
  });

  it("Theil–Sen recovers the slope and intercept of an exact line", () => {
    fc.assert(
      fc.property(
        fc.double({ min: -100, max: 100, noNaN: true }),
        fc.double({ min: -100, max: 100, noNaN: true }),
        fc.uniqueArray(fc.integer({ min: -1000, max: 1000 }), { minLength: 2, maxLength: 40 }),
        (slope, intercept, xs) => {
          const ys = xs.map((x) => intercept + slope * x);
          const r = theilSen(xs, ys);
          expect(r.slope).toBeCloseTo(slope, 6);
          expect(r.intercept).toBeCloseTo(intercept, 4);
          expect(r.lower).toBeCloseTo(slope, 6);
          expect(r.upper).toBeCloseTo(slope, 6);
        },
      ),
    );
  });

  it("Theil–Sen is robust to one wild outlier", () => {
    const xs = Array.from({ length: 50 }, (_, i) => i);
    const ys = xs.map((x) => 21.5 - 0.01 * x);
    ys[10] = 5;
    expect(theilSen(xs, ys).slope).toBeCloseTo(-0.01, 9);
  });

  it("Theil–Sen on 2,000 points runs well under a second", () => {
    const xs = Array.from({ length: 2000 }, (_, i) => i / 365);
    const ys = xs.map((x, i) => 21.4 - 0.05 * x + 0.1 * Math.sin(i * 1.7));
    const t0 = performance.now();
    const r = theilSen(xs, ys);
    const ms = performance.now() - t0;
    expect(r.pairs).toBe(1_999_000);
    expect(r.slope).toBeCloseTo(-0.05, 2);
    expect(ms).toBeLessThan(1000);
  });

  it("Theil–Sen samples pairs above maxPairs and says so", () => {
    const xs = Array.from({ length: 400 }, (_, i) => i);
    const ys = xs.map((x, i) => 3 + 0.2 * x + Math.sin(i));
    const r = theilSen(xs, ys, 0.05, { maxPairs: 20_000 });
    expect(r.sampled).toBe(true);
    expect(r.slope).toBeCloseTo(0.2, 2);
    expect(r.lower).toBeLessThan(r.slope);
    expect(r.upper).toBeGreaterThan(r.slope);
  });

  it("input validation", () => {
    expect(() => mannKendall([1, 2])).toThrow(RangeError);
    expect(() => mannKendall([1, Number.NaN, 3])).toThrow(/index 1/);
    expect(() => theilSen([1, 2], [1])).toThrow(RangeError);
    expect(() => theilSen([1, 1, 1], [1, 2, 3])).toThrow(/all x values are equal/);
    expect(() => theilSen([1, 2, 3], [1, 2, 3], 0)).toThrow(RangeError);
    expect(() =>
      seasonalKendall([
        { season: 1, x: 1, y: Number.NaN },
        { season: 1, x: 2, y: 1 },
      ]),
    ).toThrow(RangeError);
  });

  it("two-sided p of z = 0 is 1", () => {
    expect(twoSidedP(0)).toBe(1);
    const flat = mannKendall([5, 5, 5, 5]);
    expect(flat.s).toBe(0);
    expect(flat.p).toBe(1);
  });
});

describe("enoughForTrend", () => {
  const nightsFrom = (start: string, count: number, stepDays: number) => {
    const t0 = Date.parse(`${start}T00:00:00Z`);
    return Array.from({ length: count }, (_, i) => ({
      night: new Date(t0 + i * stepDays * 86_400_000).toISOString().slice(0, 10),
    }));
  };
  it("ok with 30 nights over 6+ months", () => {
    const r = enoughForTrend(nightsFrom("2024-01-01", 30, 7));
    expect(r.ok).toBe(true);
    expect(r.nights).toBe(30);
    expect(r.spanMonths).toBeGreaterThan(6);
  });
  it("too few nights", () => {
    const r = enoughForTrend(nightsFrom("2024-01-01", 20, 14));
    expect(r.ok).toBe(false);
    expect(r.reason).toMatch(/20 of the 30 nights/);
  });
  it("too short a span", () => {
    const r = enoughForTrend(nightsFrom("2024-01-01", 60, 1));
    expect(r.ok).toBe(false);
    expect(r.reason).toMatch(/months needed/);
  });
  it("duplicates count once; options apply", () => {
    const n = nightsFrom("2024-01-01", 10, 30);
    expect(enoughForTrend([...n, ...n], { minNights: 10, minMonths: 6 }).nights).toBe(10);
    expect(enoughForTrend([...n, ...n], { minNights: 10, minMonths: 6 }).ok).toBe(true);
    expect(enoughForTrend([]).ok).toBe(false);
  });
  it("rejects malformed nights", () => {
    expect(() => enoughForTrend([{ night: "2024-02-30" }])).toThrow(RangeError);
    expect(() => enoughForTrend([{ night: "yesterday" }])).toThrow(/YYYY-MM-DD/);
  });
});

describe("robust statistics", () => {
  it("median and type-7 quantiles", () => {
    expect(median([3, 1, 2])).toBe(2);
    expect(median([4, 1, 3, 2])).toBe(2.5);
    // R: quantile(1:10, c(.1,.25,.9), type = 7) = 1.9, 3.25, 9.1 (Hyndman & Fan 1996 definition 7) [calc]
    const oneToTen = Array.from({ length: 10 }, (_, i) => i + 1);
    expect(quantile(oneToTen, 0.1)).toBeCloseTo(1.9, 12);
    expect(quantile(oneToTen, 0.25)).toBeCloseTo(3.25, 12);
    expect(quantile(oneToTen, 0.9)).toBeCloseTo(9.1, 12);
    expect(quantile(oneToTen, 0)).toBe(1);
    expect(quantile(oneToTen, 1)).toBe(10);
    expect(iqr(oneToTen)).toBeCloseTo(4.5, 12);
    expect(() => quantile(oneToTen, 1.5)).toThrow(RangeError);
    expect(() => median([])).toThrow(RangeError);
  });

  it("mad", () => {
    expect(mad([1, 1, 2, 2, 4, 6, 9])).toBe(1); // median 2; |dev| = 1,1,0,0,2,4,7 → 1 [calc]
    expect(mad([1, 1, 2, 2, 4, 6, 9], MAD_NORMAL_CONSISTENCY)).toBeCloseTo(1.4826, 12);
  });

  it("does not mutate input", () => {
    const v = [3, 1, 2];
    median(v);
    quantile(v, 0.3);
    mad(v);
    expect(v).toEqual([3, 1, 2]);
  });

  it("runningMedian", () => {
    expect(runningMedian([1, 5, 2, 8, 3], 3)).toEqual([3, 2, 5, 3, 5.5]);
    expect(runningMedian([1, 5, 2, 8, 3], 3, { align: "trailing" })).toEqual([1, 3, 2, 5, 3]);
    expect(runningMedian([], 3)).toEqual([]);
    expect(runningMedian([4, 4, 4], 1)).toEqual([4, 4, 4]);
    expect(() => runningMedian([1, 2], 0)).toThrow(RangeError);
  });

  it("runningMedian equals a brute-force median (property)", () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: -50, max: 50 }), { minLength: 1, maxLength: 40 }),
        fc.integer({ min: 1, max: 9 }),
        (values, w) => {
          const before = Math.floor(w / 2);
          const after = w - 1 - before;
          const expected = values.map((_, i) =>
            median(values.slice(Math.max(0, i - before), Math.min(values.length, i + after + 1))),
          );
          expect(runningMedian(values, w)).toEqual(expected);
        },
      ),
    );
  });
});
