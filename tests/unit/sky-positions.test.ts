import * as Astronomy from "astronomy-engine";
import fc from "fast-check";
import * as SunCalc from "suncalc";
import { describe, expect, it } from "vitest";
import {
  computeKnot,
  createSkyCache,
  naiveSkyAt,
  removeSuncalcRefraction,
  screenBatch,
  skyAt,
  suncalcRefractionRad,
} from "@/ingest/screening/sky-positions";
import { DAYLIGHT, MOONLIT, TWILIGHT } from "@/lib/flags";

const RAD = Math.PI / 180;
const T2000 = Date.UTC(2000, 0, 1);
const T2040 = Date.UTC(2040, 0, 1);

describe("removeSuncalcRefraction", () => {
  it("inverts suncalc 2's refraction term exactly (its formula, node_modules/suncalc/index.js astroRefraction)", () => {
    for (let h = -30; h <= 90; h += 0.05) {
      const apparent = (h * RAD + suncalcRefractionRad(h * RAD)) / RAD;
      expect(Math.abs(removeSuncalcRefraction(apparent) - h)).toBeLessThan(1e-12);
    }
  });
  it("below the horizon removes suncalc's constant ~0.484° (DOMAIN.md: suncalc adds a constant ~0.48°)", () => {
    // source: DOMAIN.md "Sun, moon, night"; R(0) = 0.0002967/tan(0.00312536/0.08901179) rad [calc]
    expect(suncalcRefractionRad(-0.3) / RAD).toBeCloseTo(0.48396, 4);
    expect(removeSuncalcRefraction(-18 + 0.48396)).toBeCloseTo(-18, 4);
  });
  it("matches suncalc's own output: the sun at the pole has altitude = declination", () => {
    // At latitude 90° suncalc's altitude formula reduces to the declination (plus refraction).
    const d = new Date(Date.UTC(2025, 5, 21, 12));
    const alt = removeSuncalcRefraction(SunCalc.getPosition(d, 90, 0).altitude);
    // June solstice declination ≈ +23.44° (obliquity of the ecliptic, Explanatory Supplement) [pub]
    expect(alt).toBeCloseTo(23.44, 1);
    expect(computeKnot(d.getTime()).sunDec / RAD).toBeCloseTo(alt, 10);
  });
});

describe("skyAt (cached) equals the naive per-reading suncalc computation", () => {
  // Reference: naiveSkyAt = SunCalc.getPosition/getMoonPosition/getMoonIllumination per reading,
  // refraction removed. Tolerance 1e-6° (the brief); suncalc's own time rounding (~40 µs in its
  // Julian-day arithmetic) limits agreement off whole minutes to ~2e-7°.
  const cache = createSkyCache();
  const time = fc.integer({ min: T2000, max: T2040 });
  const lat = fc.double({ min: -89.9, max: 89.9, noNaN: true });
  const lon = fc.double({ min: -180, max: 180, noNaN: true });

  it("at any millisecond", () => {
    fc.assert(
      fc.property(time, lat, lon, (ms, la, lo) => {
        const d = new Date(ms);
        const a = skyAt(cache, d, la, lo);
        const b = naiveSkyAt(d, la, lo);
        expect(Math.abs(a.sunAltDeg - b.sunAltDeg)).toBeLessThan(1e-6);
        expect(Math.abs(a.moonAltDeg - b.moonAltDeg)).toBeLessThan(1e-6);
        expect(Math.abs(a.moonFraction - b.moonFraction)).toBeLessThan(1e-8);
      }),
      { numRuns: 3000 },
    );
  });

  it("on whole minutes (the knots themselves) to 1e-8°", () => {
    fc.assert(
      fc.property(time, lat, lon, (ms, la, lo) => {
        const d = new Date(Math.floor(ms / 60_000) * 60_000);
        const a = skyAt(cache, d, la, lo);
        const b = naiveSkyAt(d, la, lo);
        expect(Math.abs(a.sunAltDeg - b.sunAltDeg)).toBeLessThan(1e-8);
        expect(Math.abs(a.moonAltDeg - b.moonAltDeg)).toBeLessThan(1e-8);
        expect(Math.abs(a.moonFraction - b.moonFraction)).toBeLessThan(1e-12);
      }),
      { numRuns: 1000 },
    );
  });

  it("across suncalc's ΔT segment boundary (2005.0), computed exactly", () => {
    // 2000 + d/365.2425 = 2005 (node_modules/suncalc/index.js deltaT)
    const b = ((2005 - 2000) * 365.2425 + 0.5 + 2451545 - 2440588) * 86_400_000;
    for (const off of [-90_000, -30_000, -1, 0, 1, 17_000, 45_000, 60_000, 90_000]) {
      const d = new Date(Math.round(b + off));
      const a = skyAt(cache, d, 40, -105);
      const n = naiveSkyAt(d, 40, -105);
      expect(Math.abs(a.moonAltDeg - n.moonAltDeg)).toBeLessThan(1e-6);
    }
  });

  it("with coarser knots (10 min) stays within 1e-4° (used by the seed model)", () => {
    const coarse = createSkyCache({ stepMin: 10 });
    fc.assert(
      fc.property(time, lat, lon, (ms, la, lo) => {
        const d = new Date(ms);
        const a = skyAt(coarse, d, la, lo);
        const b = naiveSkyAt(d, la, lo);
        expect(Math.abs(a.sunAltDeg - b.sunAltDeg)).toBeLessThan(1e-4);
        expect(Math.abs(a.moonAltDeg - b.moonAltDeg)).toBeLessThan(1e-4);
      }),
      { numRuns: 500 },
    );
  });

  it("shares one knot per minute across stations and bounds its memory", () => {
    const c = createSkyCache({ maxKnots: 100 });
    const t = Date.UTC(2025, 2, 1, 3, 0);
    for (let s = 0; s < 50; s++) skyAt(c, new Date(t), -40 + s, s * 7 - 170);
    expect(c.stats.knotsComputed).toBe(1);
    for (let m = 0; m < 1000; m++) skyAt(c, new Date(t + m * 60_000), 10, 10);
    expect(c.knots.size).toBeLessThanOrEqual(100);
  });
});

describe("screenBatch", () => {
  it("returns positions and sun/moon flags per reading", () => {
    const cache = createSkyCache();
    const t = Date.UTC(2025, 0, 15, 0, 0);
    const readings = Array.from({ length: 24 * 60 }, (_, i) => ({
      takenAt: new Date(t + i * 60_000),
      mag: 21,
    }));
    const out = screenBatch(cache, { latDeg: 52.5, lonDeg: 13.4 }, readings);
    for (let i = 0; i < readings.length; i++) {
      const n = naiveSkyAt(readings[i]!.takenAt, 52.5, 13.4);
      const o = out[i]!;
      expect(Math.abs(o.sunAltDeg - n.sunAltDeg)).toBeLessThan(1e-8);
      expect((o.flags & DAYLIGHT) !== 0).toBe(n.sunAltDeg >= 0);
      expect((o.flags & TWILIGHT) !== 0).toBe(n.sunAltDeg < 0 && n.sunAltDeg >= -18);
      expect((o.flags & MOONLIT) !== 0).toBe(n.moonAltDeg >= 0);
    }
  });
});

describe("agreement with astronomy-engine (independent ephemeris, refraction off)", () => {
  // Source: astronomy-engine 2.1.19, Equator(body, date, observer, ofdate=true, aberration=true) then
  // Horizon(date, observer, ra, dec) with no refraction option; Illumination(Moon).phase_fraction.
  // Measured over 2025, half-hourly at four latitudes (70,080 samples): sun ≤ 0.0115°, moon ≤ 0.0140°
  // (DOMAIN.md: within 0.014°), fraction ≤ 1.0e-4, and 3 samples disagree on "sun below −18°", all
  // with astronomy-engine's altitude within 0.014° of −18°. Tolerances below: 0.02°, 0.02°, 0.001.
  const SUN_TOL = 0.02;
  const MOON_TOL = 0.02;
  const FRACTION_TOL = 0.001;
  const sites: Array<[number, number]> = [
    [-45, 170.5],
    [0, -78.5],
    [35, 139.7],
    [60, 10.7],
  ];

  it("sun and moon altitude, moon fraction and the night decision over a year", () => {
    const cache = createSkyCache();
    const t0 = Date.UTC(2025, 0, 1);
    let maxSun = 0;
    let maxMoon = 0;
    let maxFrac = 0;
    let samples = 0;
    for (const [lat, lon] of sites) {
      const obs = new Astronomy.Observer(lat, lon, 0);
      for (let i = 0; i < 17_520; i++) {
        const d = new Date(t0 + i * 1_800_000);
        const ours = skyAt(cache, d, lat, lon);
        const se = Astronomy.Equator(Astronomy.Body.Sun, d, obs, true, true);
        const sun = Astronomy.Horizon(d, obs, se.ra, se.dec).altitude;
        const me = Astronomy.Equator(Astronomy.Body.Moon, d, obs, true, true);
        const moon = Astronomy.Horizon(d, obs, me.ra, me.dec).altitude;
        const frac = Astronomy.Illumination(Astronomy.Body.Moon, d).phase_fraction;
        maxSun = Math.max(maxSun, Math.abs(ours.sunAltDeg - sun));
        maxMoon = Math.max(maxMoon, Math.abs(ours.moonAltDeg - moon));
        maxFrac = Math.max(maxFrac, Math.abs(ours.moonFraction - frac));
        if (ours.sunAltDeg < -18 !== sun < -18) expect(Math.abs(sun + 18)).toBeLessThan(SUN_TOL);
        samples++;
      }
    }
    expect(samples).toBe(70_080);
    expect(maxSun).toBeLessThan(SUN_TOL);
    expect(maxMoon).toBeLessThan(MOON_TOL);
    expect(maxFrac).toBeLessThan(FRACTION_TOL);
  }, 30_000);
});
