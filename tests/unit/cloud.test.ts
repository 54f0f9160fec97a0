import { describe, expect, it } from "vitest";
import { cloudSuspects, windowSpreads } from "@/ingest/screening/cloud";

const MIN = 60_000;
const opts = { cloudWindowMin: 10, cloudSpreadMag: 0.25 };

describe("cloudSuspects (range over a centred window; Hänel et al. 2018: thresholds per site)", () => {
  it("a steady sky is not flagged", () => {
    const t = Array.from({ length: 60 }, (_, i) => i * MIN);
    const m = t.map((_, i) => 21.5 + (i % 2 ? 0.02 : -0.02));
    expect(cloudSuspects(t, m, opts).some(Boolean)).toBe(false);
  });
  it("flags readings within half a window of a jump, by hand", () => {
    // minute 0..20 at 21.5 except minute 10 at 21.0; window ±5 min → minutes 5..15 see range 0.5
    const t = Array.from({ length: 21 }, (_, i) => i * MIN);
    const m = t.map((_, i) => (i === 10 ? 21.0 : 21.5));
    const flagged = cloudSuspects(t, m, opts)
      .map((f, i) => (f ? i : -1))
      .filter((i) => i >= 0);
    expect(flagged).toEqual([5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15]);
  });
  it("the spread must exceed the threshold (strictly)", () => {
    const t = [0, MIN];
    expect(cloudSuspects(t, [21, 21.25], opts)).toEqual([false, false]);
    expect(cloudSuspects(t, [21, 21.26], opts)).toEqual([true, true]);
  });
  it("a reading without time neighbours in its window is not judged", () => {
    const t = [0, 30 * MIN, 31 * MIN];
    const m = [18, 21.5, 21.5];
    expect(cloudSuspects(t, m, opts)).toEqual([false, false, false]);
    expect(windowSpreads(t, m, 10)[0]).toBeNaN();
  });
  it("matches a brute-force window range on random data", () => {
    let s = 1;
    const rnd = () => (s = (s * 16807) % 2147483647) / 2147483647;
    const t: number[] = [];
    let now = 0;
    for (let i = 0; i < 500; i++) {
      now += Math.floor(rnd() * 4) * MIN; // ties and gaps
      t.push(now);
    }
    const m = t.map(() => 21 + rnd() * 0.4);
    const fast = windowSpreads(t, m, 10);
    for (let i = 0; i < t.length; i++) {
      const idx = t.map((x, j) => (Math.abs(x - t[i]!) <= 5 * MIN ? j : -1)).filter((j) => j >= 0);
      const vals = idx.map((j) => m[j]!);
      const brute = idx.length < 2 ? Number.NaN : Math.max(...vals) - Math.min(...vals);
      if (Number.isNaN(brute)) expect(fast[i]).toBeNaN();
      else expect(fast[i]).toBeCloseTo(brute, 12);
    }
  });
  it("rejects unsorted input", () => {
    expect(() => cloudSuspects([2, 1], [1, 1], opts)).toThrow(/sorted/);
  });
});
