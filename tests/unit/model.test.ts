import { describe, expect, it } from "vitest";
import {
  airglowDriftMag,
  flux,
  magOf,
  mulberry32,
  simulateStationNight,
  simulateStationRange,
  twilightMag,
  type SimReading,
} from "@/db/seed/model";
import { createSkyCache, naiveSkyAt, skyAt } from "@/ingest/screening/sky-positions";
import { nightResolver } from "@/ingest/night";
import { summariseNight } from "@/ingest/summarise";

const denver = { lat: 35.5, lon: -106.0, timeZone: "America/Denver" };
const cache = createSkyCache({ stepMin: 10 });

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

/** Readings in astronomical night with the moon down. */
function darkOnly(readings: SimReading[], station: { lat: number; lon: number }): SimReading[] {
  return readings.filter((r) => {
    const p = skyAt(cache, r.takenAt, station.lat, station.lon);
    return p.sunAltDeg < -18 && p.moonAltDeg < 0;
  });
}

describe("seed model building blocks", () => {
  it("flux and magnitude invert; 5 mag = ×100 (Pogson, DOMAIN.md)", () => {
    expect(flux(16) / flux(21)).toBeCloseTo(100, 9);
    expect(magOf(flux(21.8))).toBeCloseTo(21.8, 12);
  });
  it("mulberry32 is deterministic and in [0, 1)", () => {
    const a = mulberry32(1);
    const b = mulberry32(1);
    for (let i = 0; i < 1000; i++) {
      const x = a();
      expect(x).toBe(b());
      expect(x >= 0 && x < 1).toBe(true);
    }
  });
  it("twilight model: 11.8 at −6°, 18.4 at −12°, 25 at −18° (documented model, not a measurement)", () => {
    expect(twilightMag(-6)).toBeCloseTo(11.8, 12);
    expect(twilightMag(-12)).toBeCloseTo(18.4, 12);
    expect(twilightMag(-18)).toBeCloseTo(25, 12);
  });
  it("airglow drift is a 0.15-mag sinusoid (Krisciunas 1997: natural sky follows the solar cycle)", () => {
    expect(airglowDriftMag(new Date(Date.UTC(2019, 10, 24)))).toBeCloseTo(0.15, 3); // solar minimum 2019.9
    expect(Math.abs(airglowDriftMag(new Date(Date.UTC(2022, 7, 25))))).toBeLessThan(0.01); // quarter cycle later
  });
});

describe("simulateStationNight", () => {
  const base = { station: denver, seed: 11, baseMag: 21.8, startDate: "2022-01-01" };

  it("is deterministic: same seed, same output; another seed differs", () => {
    const a = simulateStationNight({ ...base, night: "2022-03-01" });
    const b = simulateStationNight({ ...base, night: "2022-03-01" });
    expect(a.length).toBeGreaterThan(500);
    expect(b).toEqual(a);
    const c = simulateStationNight({ ...base, seed: 12, night: "2022-03-01" });
    expect(c).not.toEqual(a);
    // a night's output does not depend on which range produced it
    const fromRange = [
      ...simulateStationRange({ ...base, fromNight: "2022-02-27", toNight: "2022-03-01" }),
    ];
    expect(fromRange[2]!.readings).toEqual(a);
  });

  it("no reading in daylight, nor with the Sun above −6° (naive suncalc check), and all in their night", () => {
    for (const station of [
      denver,
      { lat: 60.2, lon: 24.9, timeZone: "Europe/Helsinki" },
      { lat: -33.9, lon: 151.2, timeZone: "Australia/Sydney" },
    ]) {
      const resolve = nightResolver(station.timeZone);
      for (const night of ["2022-03-20", "2022-06-21", "2022-12-21"]) {
        for (const r of simulateStationNight({ ...base, station, night })) {
          expect(naiveSkyAt(r.takenAt, station.lat, station.lon).sunAltDeg).toBeLessThan(-6 + 1e-3);
          expect(resolve(r.takenAt)).toBe(night);
        }
      }
    }
  });

  it("a dark station's clear, moonless median is near its base (±0.1) when airglow is neutral", () => {
    // 2022-08-15..2022-09-15: a quarter solar cycle after the 2019.9 minimum, so the drift is ~0
    const meds: number[] = [];
    for (const { readings } of simulateStationRange({
      ...base,
      cloudyNightFraction: 0,
      fromNight: "2022-08-15",
      toNight: "2022-09-15",
    })) {
      const dark = darkOnly(readings, denver);
      if (dark.length >= 60) meds.push(median(dark.map((r) => r.mag)));
    }
    expect(meds.length).toBeGreaterThan(10);
    for (const m of meds) expect(Math.abs(m - 21.8)).toBeLessThan(0.1);
  });

  it("in other years the natural drift moves a dark site's median with the solar cycle", () => {
    const night = "2024-11-01"; // new moon 2024-11-01
    const dark = darkOnly(simulateStationNight({ ...base, night, cloudyNightFraction: 0 }), denver);
    const expected = 21.8 + airglowDriftMag(new Date(Date.UTC(2024, 10, 2)));
    expect(Math.abs(median(dark.map((r) => r.mag)) - expected)).toBeLessThan(0.1);
  });

  it("the moon brightens the sky but never beyond ~18 mag/arcsec² (full moon 2024-12-15)", () => {
    const r = simulateStationNight({ ...base, night: "2024-12-15", cloudyNightFraction: 0 });
    const moonUp = r.filter((x) => {
      const p = skyAt(cache, x.takenAt, denver.lat, denver.lon);
      return p.sunAltDeg < -18 && p.moonAltDeg > 45;
    });
    expect(moonUp.length).toBeGreaterThan(30);
    const m = median(moonUp.map((x) => x.mag));
    expect(m).toBeLessThan(19);
    expect(Math.min(...moonUp.map((x) => x.mag))).toBeGreaterThan(17.8);
  });

  it("clouds darken a dark site slightly and brighten a lit one", () => {
    const night = "2022-09-24"; // new moon 2022-09-25
    for (const [baseMag, sign] of [
      [21.8, 1],
      [18.0, -1],
    ] as const) {
      const opts = { ...base, baseMag, night };
      const clear = darkOnly(simulateStationNight({ ...opts, cloudyNightFraction: 0 }), denver).map(
        (r) => r.mag,
      );
      const cloudy = darkOnly(
        simulateStationNight({ ...opts, cloudyNightFraction: 1 }),
        denver,
      ).map((r) => r.mag);
      const diffs = cloudy.map((m, i) => m - clear[i]!);
      const changed = diffs.filter((d) => Math.abs(d) > 0.05);
      expect(changed.length).toBeGreaterThan(10);
      expect(Math.sign(median(changed))).toBe(sign);
    }
  });

  it("a brightening station's yearly medians trend down by about the set rate", () => {
    const rate = -0.1; // mag/arcsec² per year
    const yearly = new Map<string, number[]>();
    const resolve = { lat: denver.lat, lon: denver.lon };
    for (const { night, readings } of simulateStationRange({
      station: denver,
      seed: 5,
      baseMag: 20.0,
      brighteningMagPerYear: rate,
      airglowAmplitudeMag: 0,
      startDate: "2022-01-01",
      cadenceMin: 5,
      fromNight: "2022-01-01",
      toNight: "2024-12-30",
      cache,
    })) {
      const s = summariseNight(
        readings.map((r) => {
          const p = skyAt(cache, r.takenAt, resolve.lat, resolve.lon);
          return {
            takenAt: r.takenAt,
            mag: r.mag,
            flags: 0,
            sunAltDeg: p.sunAltDeg,
            moonAltDeg: p.moonAltDeg,
          };
        }),
        {
          calibrationOffsetMag: 0,
          cloudWindowMin: 15,
          cloudSpreadMag: 0.25,
          sunMaxAltDeg: -18,
          moonMaxAltDeg: 0,
        },
      );
      if (s.medianMag !== null && s.usableHours >= 1) {
        const y = night.slice(0, 4);
        yearly.set(y, [...(yearly.get(y) ?? []), s.medianMag]);
      }
    }
    const m = ["2022", "2023", "2024"].map((y) => median(yearly.get(y)!));
    expect(m[0]!).toBeCloseTo(20.0 + rate * 0.5, 1);
    expect(m[1]! - m[0]!).toBeGreaterThan(rate - 0.03);
    expect(m[1]! - m[0]!).toBeLessThan(rate + 0.03);
    expect(m[2]! - m[1]!).toBeGreaterThan(rate - 0.03);
    expect(m[2]! - m[1]!).toBeLessThan(rate + 0.03);
  }, 30_000);

  it("a step (new lighting) applies from its night on", () => {
    const step = { fromNight: "2022-09-24", deltaMag: -0.5 };
    const opts = { ...base, baseMag: 20, cloudyNightFraction: 0, airglowAmplitudeMag: 0, step };
    const before = median(
      darkOnly(simulateStationNight({ ...opts, night: "2022-09-23" }), denver).map((r) => r.mag),
    );
    const after = median(
      darkOnly(simulateStationNight({ ...opts, night: "2022-09-24" }), denver).map((r) => r.mag),
    );
    expect(before - after).toBeGreaterThan(0.4);
  });

  it("a year of minute data for one station runs fast (spec < 3 s; bound here 8 s for a shared machine)", () => {
    const t = performance.now();
    let n = 0;
    for (const { readings } of simulateStationRange({
      ...base,
      fromNight: "2023-01-01",
      toNight: "2023-12-31",
    }))
      n += readings.length;
    const ms = performance.now() - t;
    expect(n).toBeGreaterThan(200_000);
    expect(ms).toBeLessThan(8000);
  }, 20_000);

  it("the range generator is lazy (yields per night)", () => {
    const it = simulateStationRange({ ...base, fromNight: "2000-01-01", toNight: "2099-12-31" });
    const first = it.next();
    expect(first.done).toBe(false);
    expect(first.value && first.value.night).toBe("2000-01-01");
  });
});
