import { describe, expect, it } from "vitest";
import { CLOUD_SUSPECT, MOONLIT, OUT_OF_RANGE, TWILIGHT } from "@/lib/flags";
import { nightOf } from "@/ingest/night";
import {
  calibrationOffsetAt,
  sortedMedian,
  sortedQuantile,
  summariseNight,
  type SummaryOptions,
} from "@/ingest/summarise";

const MIN = 60_000;
const T0 = Date.UTC(2025, 0, 15, 22, 0);
const opts: SummaryOptions = {
  calibrationOffsetMag: 0,
  cloudWindowMin: 15,
  cloudSpreadMag: 0.25,
  sunMaxAltDeg: -18,
  moonMaxAltDeg: 0,
};
const series = (mags: number[], stepMin = 1, flags = 0) =>
  mags.map((mag, i) => ({ takenAt: new Date(T0 + i * stepMin * MIN), mag, flags }));

describe("median and quartiles (by hand; quartiles 'type 7' as R's quantile default)", () => {
  it("median", () => {
    expect(sortedMedian([1, 2, 3])).toBe(2);
    expect(sortedMedian([1, 2, 3, 4])).toBe(2.5);
  });
  it("quartiles of 1..4: R quantile(1:4, c(.25,.75)) = 1.75, 3.25", () => {
    expect(sortedQuantile([1, 2, 3, 4], 0.25)).toBeCloseTo(1.75, 12);
    expect(sortedQuantile([1, 2, 3, 4], 0.75)).toBeCloseTo(3.25, 12);
  });
});

describe("summariseNight", () => {
  it("hand-checked small night, calibrated values", () => {
    const raw = [21.0, 21.2, 21.1, 21.4, 21.3, 21.5, 21.6, 21.2, 21.3, 21.4];
    const s = summariseNight(series(raw), {
      ...opts,
      calibrationOffsetMag: 0.1,
      cloudSpreadMag: 1,
    });
    // calibrated sorted: 21.1 21.2 21.3 21.3 21.4 21.4 21.5 21.5 21.6 21.7
    expect(s.readings).toBe(10);
    expect(s.usableReadings).toBe(10);
    expect(s.medianMag).toBeCloseTo(21.4, 10); // (21.4 + 21.4) / 2
    // Q1 at position 2.25 → 21.3; Q3 at 6.75 → 21.5
    expect(s.spreadMag).toBeCloseTo(0.2, 10);
    expect(s.calibrationOffsetMag).toBe(0.1);
    // 10 one-minute readings: 30-min windows need ≥ 15 → no darkest sustained value
    expect(s.darkestSustainedMag).toBeNull();
    expect(s.cadenceMin).toBe(1);
    expect(s.usableHours).toBeCloseTo(10 / 60, 12);
    expect(s.firstAt?.toISOString()).toBe(new Date(T0).toISOString());
    expect(s.lastAt?.toISOString()).toBe(new Date(T0 + 9 * MIN).toISOString());
  });

  it("darkest sustained: highest 30-minute running median, robust to a spike", () => {
    const raw = [...Array(30).fill(21.0), ...Array(30).fill(21.6)] as number[];
    raw[50] = 22.5; // a spike does not move a median
    const s = summariseNight(series(raw), { ...opts, cloudSpreadMag: 2 });
    expect(s.darkestSustainedMag).toBeCloseTo(21.6, 10);
    // A window from minute 45 holds 15 readings = 50 % coverage: it still counts, and the last
    // windows (fewer than 15 readings) do not, so the spike never becomes the value.
    const short = summariseNight(series([21.0, 21.0, 22.0, 22.0]), {
      ...opts,
      cloudSpreadMag: 2,
      cadenceHintMin: 10,
    });
    // cadence 10 min (hint): a 30-min window needs ≥ 2 readings; window from each start: [21,21,22],
    // [21,22,22], [22,22], [22] → medians 21, 22, 22, (too few) → 22
    expect(short.darkestSustainedMag).toBe(22);
  });

  it("a cloudy window is flagged and left out", () => {
    const raw = Array.from({ length: 60 }, (_, i) =>
      i >= 20 && i <= 30 ? (i % 2 === 0 ? 21.0 : 21.6) : 21.5,
    );
    const s = summariseNight(series(raw), opts);
    const flagged = s.cloudFlags
      .map((m, i) => ((m & CLOUD_SUSPECT) !== 0 ? i : -1))
      .filter((i) => i >= 0);
    // any window (±7.5 min) holding a 21.0 (minutes 20, 22, …, 30) spans 0.5 mag > 0.25 → minutes 13..37
    expect(flagged).toEqual(Array.from({ length: 25 }, (_, k) => 13 + k));
    expect(s.flagCounts.cloudSuspect).toBe(25);
    expect(s.usableReadings).toBe(35);
    expect(s.medianMag).toBe(21.5);
    expect(s.spreadMag).toBe(0);
  });

  it("re-screens from stored positions; twilight does not make the first night readings cloudy", () => {
    const readings = Array.from({ length: 40 }, (_, i) => ({
      takenAt: new Date(T0 + i * MIN),
      mag: i < 10 ? 18 + i * 0.3 : 21.5,
      flags: 0,
      sunAltDeg: i < 10 ? -16 : -25,
      moonAltDeg: i >= 35 ? 2 : -10,
    }));
    const s = summariseNight(readings, opts);
    expect(s.flagCounts.twilight).toBe(10);
    expect(s.flagCounts.moonlit).toBe(5);
    expect(s.flagCounts.cloudSuspect).toBe(0);
    expect(s.usableReadings).toBe(25);
    expect(s.cloudFlags[0]).toBe(TWILIGHT);
    expect(s.cloudFlags[39]).toBe(MOONLIT);
    // a site that accepts −15°: the twilight readings now count, and their steep change is cloud-like
    const lax = summariseNight(readings, { ...opts, sunMaxAltDeg: -15 });
    expect(lax.flagCounts.twilight).toBe(0);
    expect(lax.flagCounts.cloudSuspect).toBeGreaterThan(0);
  });

  it("keeps stored flags without positions, recomputes the cloud bit, counts each flag", () => {
    const r = series([21.5, 21.5, 21.5, 21.5, 21.5]);
    r[0]!.flags = TWILIGHT | CLOUD_SUSPECT; // stale cloud bit is dropped
    r[1]!.flags = OUT_OF_RANGE;
    const s = summariseNight(r, opts);
    expect(s.cloudFlags).toEqual([TWILIGHT, OUT_OF_RANGE, 0, 0, 0]);
    expect(s.flagCounts).toEqual({
      daylight: 0,
      twilight: 1,
      moonlit: 0,
      cloudSuspect: 0,
      outOfRange: 1,
      usable: 3,
    });
  });

  it("usable hours: a gap is not counted, a burst does not inflate", () => {
    // 1-minute cadence, 10 readings, a 2-hour gap, 10 readings, plus a duplicate-second burst
    const times = [
      ...Array.from({ length: 10 }, (_, i) => T0 + i * MIN),
      ...Array.from({ length: 10 }, (_, i) => T0 + 130 * MIN + i * MIN),
      T0 + 139 * MIN + 1000,
    ];
    const s = summariseNight(
      times.map((t) => ({ takenAt: new Date(t), mag: 21.5, flags: 0 })),
      opts,
    );
    expect(s.cadenceMin).toBe(1);
    // 19 readings × 1 min, the one before the burst 1 s, the last one 1 min → 20 min + 1 s
    expect(s.usableHours * 60).toBeCloseTo(20 + 1 / 60, 9);
  });

  it("empty and no-usable nights return nulls", () => {
    const e = summariseNight([], opts);
    expect(e).toMatchObject({
      readings: 0,
      usableReadings: 0,
      medianMag: null,
      darkestSustainedMag: null,
      spreadMag: null,
      usableHours: 0,
      firstAt: null,
      lastAt: null,
    });
    const m = summariseNight(series([21, 21], 1, MOONLIT), opts);
    expect(m).toMatchObject({
      readings: 2,
      usableReadings: 0,
      medianMag: null,
      darkestSustainedMag: null,
      spreadMag: null,
      usableHours: 0,
    });
    expect(m.flagCounts.moonlit).toBe(2);
  });

  it("a DST night (Europe/Berlin, 2025-10-25/26, 25 h): one night, hours in real elapsed time", () => {
    // 19:00 CEST (17:00Z) to 05:00 CET (04:00Z) = 11 h of one-minute readings
    const start = Date.UTC(2025, 9, 25, 17, 0);
    const readings = Array.from({ length: 11 * 60 }, (_, i) => ({
      takenAt: new Date(start + i * MIN),
      mag: 21.3,
      flags: 0,
    }));
    expect(new Set(readings.map((r) => nightOf(r.takenAt, "Europe/Berlin")))).toEqual(
      new Set(["2025-10-25"]),
    );
    const s = summariseNight(readings, opts);
    expect(s.usableHours).toBeCloseTo(11, 12);
    expect(s.medianMag).toBeCloseTo(21.3, 12);
    expect(s.darkestSustainedMag).toBeCloseTo(21.3, 12);
  });

  it("unsorted input: flags come back in input order", () => {
    const r = series([21.5, 21.5, 21.5, 21.5]).reverse();
    r[0]!.flags = MOONLIT; // the latest reading
    const s = summariseNight(r, opts);
    expect(s.cloudFlags).toEqual([MOONLIT, 0, 0, 0]);
    expect(s.firstAt?.getTime()).toBe(T0);
  });
});

describe("calibrationOffsetAt", () => {
  const cals = [
    { effectiveFrom: "2024-06-15", offsetMag: -0.05 },
    { effectiveFrom: "2024-01-01", offsetMag: 0.1 },
  ];
  it("picks the latest entry on or before the night", () => {
    expect(calibrationOffsetAt(cals, "2023-12-31")).toBe(0);
    expect(calibrationOffsetAt(cals, "2024-01-01")).toBe(0.1);
    expect(calibrationOffsetAt(cals, "2024-06-14")).toBe(0.1);
    expect(calibrationOffsetAt(cals, "2024-06-15")).toBe(-0.05);
    expect(calibrationOffsetAt([], "2024-06-15")).toBe(0);
  });
});
