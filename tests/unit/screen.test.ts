import { describe, expect, it } from "vitest";
import { DAYLIGHT, MOONLIT, OUT_OF_RANGE, TWILIGHT } from "@/lib/flags";
import { screenReading, validateMag } from "@/ingest/screening/screen";

describe("screenReading (Explanatory Supplement twilight definitions; site defaults sun −18°, moon 0°)", () => {
  const r = (sunAltDeg: number, moonAltDeg = -10, mag = 21) => ({ mag, sunAltDeg, moonAltDeg });
  it("daylight at and above 0°", () => {
    expect(screenReading(r(0))).toBe(DAYLIGHT);
    expect(screenReading(r(35))).toBe(DAYLIGHT);
  });
  it("twilight from −18° (inclusive) up to 0°", () => {
    expect(screenReading(r(-0.01))).toBe(TWILIGHT);
    expect(screenReading(r(-14.2))).toBe(TWILIGHT);
    expect(screenReading(r(-18))).toBe(TWILIGHT);
    expect(screenReading(r(-18.0001))).toBe(0);
  });
  it("site thresholds apply", () => {
    expect(screenReading(r(-16), { sunMaxAltDeg: -15 })).toBe(0);
    expect(screenReading(r(-30, -3), { moonMaxAltDeg: -5 })).toBe(MOONLIT);
    expect(screenReading(r(-30, -6), { moonMaxAltDeg: -5 })).toBe(0);
  });
  it("moonlit at or above the moon limit", () => {
    expect(screenReading(r(-30, 0))).toBe(MOONLIT);
    expect(screenReading(r(-10, 20))).toBe(TWILIGHT | MOONLIT);
  });
  it("out-of-range outside [10, 22.6] (common practice range, configurable)", () => {
    expect(screenReading(r(-30, -10, 9.99))).toBe(OUT_OF_RANGE);
    expect(screenReading(r(-30, -10, 10))).toBe(0);
    expect(screenReading(r(-30, -10, 22.6))).toBe(0);
    expect(screenReading(r(-30, -10, 22.61))).toBe(OUT_OF_RANGE);
    expect(screenReading(r(-30, -10, Number.NaN))).toBe(OUT_OF_RANGE);
  });
});

describe("validateMag (rejection, not stored)", () => {
  it("accepts finite numbers in [0, 24]", () => {
    for (const m of [0, 5, 21.8, 24]) expect(validateMag(m)).toBeNull();
  });
  it("rejects with a reason", () => {
    // 0 mag/arcsec² ≈ 1.08e5 cd/m² with K = 1.08e5 (DOMAIN.md photometry)
    expect(validateMag(-0.1)).toMatch(/brighter than 0/);
    expect(validateMag(24.01)).toMatch(/darker than 24/);
    expect(validateMag(Number.NaN)).toMatch(/NaN/);
    expect(validateMag(Number.POSITIVE_INFINITY)).toMatch(/finite/);
    expect(validateMag("21.5")).toMatch(/number/);
    expect(validateMag(null)).toMatch(/number/);
  });
});
