import { describe, expect, it } from "vitest";
import {
  CLOUD_SUSPECT,
  DAYLIGHT,
  MOONLIT,
  OUT_OF_RANGE,
  TWILIGHT,
  explainFlags,
  flagMask,
  flagNames,
  isUsable,
  twilightName,
} from "@/lib/flags";

const thresholds = {
  sunMaxAltDeg: -18,
  moonMaxAltDeg: 0,
  cloudWindowMin: 15,
  cloudSpreadMag: 0.25,
};

describe("flag bitmask", () => {
  it("has the agreed bit values (lib/flags.ts contract, db/schema/readings.ts flags smallint)", () => {
    expect([DAYLIGHT, TWILIGHT, MOONLIT, CLOUD_SUSPECT, OUT_OF_RANGE]).toEqual([1, 2, 4, 8, 16]);
  });
  it("names flags in bit order and round-trips (PRODUCT.md vocabulary)", () => {
    expect(flagNames(0)).toEqual([]);
    expect(flagNames(TWILIGHT | MOONLIT)).toEqual(["twilight", "moonlit"]);
    expect(flagNames(31)).toEqual([
      "daylight",
      "twilight",
      "moonlit",
      "cloud-suspect",
      "out-of-range",
    ]);
    expect(flagNames(64)).toEqual([]);
    for (let m = 0; m < 32; m++) expect(flagMask(flagNames(m))).toBe(m);
  });
  it("usable means no flag", () => {
    expect(isUsable(0)).toBe(true);
    expect(isUsable(CLOUD_SUSPECT)).toBe(false);
  });
});

describe("twilightName (Explanatory Supplement: civil 0..−6, nautical −6..−12, astronomical −12..−18)", () => {
  it("bands", () => {
    expect(twilightName(3)).toBe("daylight");
    expect(twilightName(-3)).toBe("civil twilight");
    expect(twilightName(-9)).toBe("nautical twilight");
    expect(twilightName(-14.2)).toBe("astronomical twilight");
    expect(twilightName(-20)).toBe("astronomical night");
  });
});

describe("explainFlags", () => {
  it("twilight sentence with a true minus sign", () => {
    const s = explainFlags(TWILIGHT, { mag: 20.1, sunAltDeg: -14.23, moonAltDeg: -30 }, thresholds);
    expect(s).toEqual(["Sun at \u221214.2°, above the \u221218° limit (astronomical twilight)."]);
  });
  it("one sentence per flag", () => {
    const s = explainFlags(
      DAYLIGHT | MOONLIT | CLOUD_SUSPECT | OUT_OF_RANGE,
      { mag: 8.5, sunAltDeg: 12.34, moonAltDeg: 23.5, moonFraction: 0.583 },
      thresholds,
    );
    expect(s).toHaveLength(4);
    expect(s[0]).toBe("Sun at 12.3°, above the horizon (daylight).");
    expect(s[1]).toBe("Moon at 23.5°, above the 0° limit (moonlit, 58 % illuminated).");
    expect(s[2]).toBe(
      "Readings within 7.5 minutes of this one vary by more than 0.25 mag/arcsec² (cloud suspected).",
    );
    expect(s[3]).toBe(
      "8.50 mag/arcsec² is outside the meter's usual calibrated range 10–22.6 (kept, not counted).",
    );
  });
  it("a usable reading says why it counted", () => {
    const s = explainFlags(0, { mag: 21.7, sunAltDeg: -25, moonAltDeg: -4.2 }, thresholds);
    expect(s).toEqual([
      "Counted: Sun at \u221225.0°, below the \u221218° limit, and Moon at \u22124.2°, below the 0° limit.",
    ]);
  });
});
