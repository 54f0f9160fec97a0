import { describe, expect, it } from "vitest";
import { evaluateCondition } from "@/lib/alerts/conditions";
import { DEFAULT_RULE_PARAMS, parseRuleParams } from "@/lib/alerts/rules";
import { addDays } from "@/ingest/night";
import {
  brighterPercent,
  compareWithBaseline,
  enoughNights,
  largestStep,
  shiftYears,
  siteTrend,
  type NightValue,
} from "@/lib/trends/site-trend";

/** Nightly values from `start`, one per `everyDays` days, mag = f(i). */
function series(
  start: string,
  count: number,
  f: (i: number) => number,
  everyDays = 1,
): NightValue[] {
  return Array.from({ length: count }, (_, i) => ({
    night: addDays(start, i * everyDays),
    mag: f(i),
  }));
}

describe("minimum data: ≥ 30 usable nights in ≥ 6 distinct calendar months", () => {
  it("counts distinct months, not the span", () => {
    // 40 nights: 20 in January, 20 in July — a 6-month span but only 2 distinct months.
    const v = [...series("2025-01-01", 20, () => 21), ...series("2025-07-01", 20, () => 21)];
    const r = enoughNights(v);
    expect(r).toMatchObject({ ok: false, nights: 40, months: 2 });
    expect(r.message).toBe("Not enough nights yet: 2 of the 6 different months needed.");
  });
  it("passes at exactly 30 nights in 6 months (5 a month, hand-counted)", () => {
    const v = [0, 1, 2, 3, 4, 5].flatMap((m) => series(`2025-0${m + 1}-01`, 5, () => 21));
    expect(enoughNights(v)).toMatchObject({ ok: true, nights: 30, months: 6 });
    expect(enoughNights(v.slice(1)).message).toBe(
      "Not enough nights yet: 29 of the 30 usable nights needed.",
    );
  });
  it("siteTrend answers not-enough with the message", () => {
    const r = siteTrend(series("2025-01-01", 25, () => 21));
    expect(r.status).toBe("not-enough");
    expect(r.message).toMatch(
      /^Not enough nights yet: 25 of the 30 usable nights needed and 1 of the 6 different months needed\.$/,
    );
  });
});

describe("siteTrend", () => {
  it("recovers a known slope with Theil–Sen (synthetic: −0.06 mag/yr, one night in three, ±0.05 alternating noise)", () => {
    // y = 21.5 − 0.06·t + noise, t in years = days/365.25: the exact slope is recovered because the
    // alternating noise is symmetric; 200 nights over ~1.6 years, 20 months.
    const v = series(
      "2024-01-01",
      200,
      (i) => 21.5 - (0.06 * (i * 3)) / 365.25 + (i % 2 === 0 ? 0.05 : -0.05),
      3,
    );
    const r = siteTrend(v);
    if (r.status !== "ok") throw new Error(r.message);
    expect(r.slopeMagPerYear).toBeCloseTo(-0.06, 2);
    expect(r.lowerMagPerYear).toBeLessThan(-0.06);
    expect(r.upperMagPerYear).toBeGreaterThan(-0.06);
    expect(r.significant).toBe(true);
    expect(r.direction).toBe("brightening");
    // % per year from a slope s: 100·(10^(−0.4·s) − 1) (docs DOMAIN.md) [calc]: −0.06 → +5.68 %.
    expect(r.brighteningPercentPerYear).toBeCloseTo(100 * (Math.pow(10, 0.024) - 1), 0);
    expect(r.seasonal?.seasons).toBeGreaterThan(6);
  });
  it("a flat, alternating series (21.7, 21.8, …) is not significant", () => {
    const v = series("2024-01-01", 120, (i) => (i % 2 ? 21.7 : 21.8), 3);
    const r = siteTrend(v);
    if (r.status !== "ok") throw new Error(r.message);
    expect(r.significant).toBe(false);
    expect(r.direction).toBe("none");
  });
});

describe("baseline comparison", () => {
  it("last N nights vs the same dates a year earlier (hand-computed medians)", () => {
    const before = series("2024-03-01", 10, (i) => 21.6 + i * 0.01); // median 21.645
    const after = series("2025-03-01", 10, (i) => 21.3 + i * 0.01); // median 21.345
    const r = compareWithBaseline([...before, ...after], {
      recentNights: 10,
      minBaselineNights: 5,
    });
    if (r.status !== "ok") throw new Error(r.message);
    expect(r.recent).toMatchObject({ from: "2025-03-01", to: "2025-03-10", nights: 10 });
    expect(r.baseline).toMatchObject({ from: "2024-03-01", to: "2024-03-10", nights: 10 });
    expect(r.diffMag).toBeCloseTo(-0.3, 10);
    // Pogson: 0.3 mag brighter = 10^(0.12) = 1.318 → 31.8 % brighter [calc].
    expect(r.brighterPercent).toBeCloseTo(31.83, 2);
  });
  it("a fixed baseline period set by the steward", () => {
    const v = [...series("2024-06-01", 20, () => 21.0), ...series("2025-01-01", 30, () => 20.8)];
    const r = compareWithBaseline(v, {
      recentNights: 30,
      baseline: { kind: "period", from: "2024-06-01", to: "2024-06-30" },
    });
    expect(r.status === "ok" && r.diffMag).toBeCloseTo(-0.2, 6);
  });
  it("says how many baseline nights are missing", () => {
    const r = compareWithBaseline(
      series("2025-01-01", 40, () => 21),
      { recentNights: 30 },
    );
    expect(r).toEqual({
      status: "not-enough",
      message:
        "Not enough nights yet: 0 of the 10 baseline nights needed in the same dates a year earlier.",
    });
  });
  it("shifts 29 February to 28 February", () => {
    expect(shiftYears("2024-02-29", -1)).toBe("2023-02-28");
    expect(shiftYears("2025-03-01", -1)).toBe("2024-03-01");
  });
  it("brighterPercent: −1 mag is 2.512× (Pogson, 100^(1/5)) [calc]", () => {
    expect(brighterPercent(-1)).toBeCloseTo(151.1886, 3);
    expect(brighterPercent(0.5)).toBeCloseTo(-36.9043, 3);
  });
});

describe("sudden step and rule conditions", () => {
  const steady = (i: number) => 20.8 + (i % 3) * 0.01;
  it("finds a −0.4 mag step and dates it by its first night", () => {
    const v = [
      ...series("2025-01-01", 60, steady),
      ...series("2025-03-02", 60, (i) => steady(i) - 0.4),
    ];
    const s = largestStep(v, { windowNights: 14 });
    expect(s?.night).toBe("2025-03-02");
    expect(s?.shiftMag).toBeCloseTo(-0.4, 6);
  });
  it("rule outcomes: step fires at 0.25, below_target, not-enough is null (neither opens nor clears)", () => {
    const v = [
      ...series("2025-01-01", 60, steady),
      ...series("2025-03-02", 60, (i) => steady(i) - 0.4),
    ];
    const input = { values: v, targetMag: 20.6, stations: [], referenceNight: "2025-04-30" };
    const [step] = evaluateCondition("sudden_step", DEFAULT_RULE_PARAMS.sudden_step, input);
    expect(step).toMatchObject({
      active: true,
      targetKey: "site",
      details: { since: "2025-03-02" },
    });
    const [below] = evaluateCondition("below_target", DEFAULT_RULE_PARAMS.below_target, input);
    expect(below?.active).toBe(true); // median 20.41 < 20.6
    const [trend] = evaluateCondition("brightening_trend", DEFAULT_RULE_PARAMS.brightening_trend, {
      ...input,
      values: v.slice(0, 20),
    });
    expect(trend?.active).toBeNull();
    expect(trend?.summary).toMatch(/^Not enough nights yet/);
  });
  it("station silent counts only the nights it normally reports on", () => {
    // Reported every other night up to 2025-03-30 (15 of the 30 nights before), then quiet.
    const reportedNights = Array.from({ length: 15 }, (_, i) => addDays("2025-03-30", -2 * i));
    const st = { id: "s1", name: "North", slug: "north", reportedNights };
    const at = (ref: string) =>
      evaluateCondition("station_silent", DEFAULT_RULE_PARAMS.station_silent, {
        values: [],
        targetMag: 21,
        stations: [st],
        referenceNight: ref,
      })[0]!;
    expect(at("2025-04-08").active).toBe(false); // 9 nights × 0.5 = 4.5 expected reports missing
    expect(at("2025-04-09").active).toBe(true); // 10 × 0.5 = 5
  });
  it("rule params are validated per kind", () => {
    expect(() =>
      parseRuleParams("sudden_step", { ...DEFAULT_RULE_PARAMS.sudden_step, thresholdMag: -1 }),
    ).toThrow();
    expect(
      parseRuleParams("darkening_vs_baseline", {
        ...DEFAULT_RULE_PARAMS.darkening_vs_baseline,
        thresholdMag: "0.3",
      }).thresholdMag,
    ).toBe(0.3);
  });
});
