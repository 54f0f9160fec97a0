import { describe, expect, it } from "vitest";
import { addDays, nightBounds, nightOf, nightResolver } from "@/ingest/night";

const at = (iso: string) => new Date(iso);
const hours = (b: { start: Date; end: Date }) => (b.end.getTime() - b.start.getTime()) / 3_600_000;

describe("nightOf: named by the local evening date, noon to noon", () => {
  it("evening and the following morning share a night", () => {
    // Europe/Berlin is UTC+1 in January (IANA tz database)
    expect(nightOf(at("2025-01-14T22:30:00Z"), "Europe/Berlin")).toBe("2025-01-14"); // 23:30 local
    expect(nightOf(at("2025-01-15T03:10:00Z"), "Europe/Berlin")).toBe("2025-01-14"); // 04:10 local
    expect(nightOf(at("2025-01-15T10:59:59Z"), "Europe/Berlin")).toBe("2025-01-14"); // 11:59:59 local
    expect(nightOf(at("2025-01-15T11:00:00Z"), "Europe/Berlin")).toBe("2025-01-15"); // noon local
  });

  it("Europe/Berlin spring forward (2025-03-30 01:00 UTC, EU Directive 2000/84/EC): a 23-hour night", () => {
    expect(nightOf(at("2025-03-30T00:30:00Z"), "Europe/Berlin")).toBe("2025-03-29"); // 01:30 CET
    expect(nightOf(at("2025-03-30T01:30:00Z"), "Europe/Berlin")).toBe("2025-03-29"); // 03:30 CEST
    expect(nightOf(at("2025-03-30T09:59:00Z"), "Europe/Berlin")).toBe("2025-03-29"); // 11:59 CEST
    expect(nightOf(at("2025-03-30T10:00:00Z"), "Europe/Berlin")).toBe("2025-03-30"); // 12:00 CEST
    const b = nightBounds("2025-03-29", "Europe/Berlin");
    expect(b.start.toISOString()).toBe("2025-03-29T11:00:00.000Z");
    expect(b.end.toISOString()).toBe("2025-03-30T10:00:00.000Z");
    expect(hours(b)).toBe(23);
  });

  it("Europe/Berlin fall back (2025-10-26 01:00 UTC): a 25-hour night", () => {
    expect(hours(nightBounds("2025-10-25", "Europe/Berlin"))).toBe(25);
    expect(nightOf(at("2025-10-26T00:30:00Z"), "Europe/Berlin")).toBe("2025-10-25"); // 02:30 CEST
    expect(nightOf(at("2025-10-26T01:30:00Z"), "Europe/Berlin")).toBe("2025-10-25"); // 02:30 CET
  });

  it("America/Denver (US: 2nd Sunday of March, 1st Sunday of November)", () => {
    expect(hours(nightBounds("2025-03-08", "America/Denver"))).toBe(23);
    const b = nightBounds("2025-11-01", "America/Denver");
    expect(b.start.toISOString()).toBe("2025-11-01T18:00:00.000Z"); // noon MDT
    expect(b.end.toISOString()).toBe("2025-11-02T19:00:00.000Z"); // noon MST
    expect(nightOf(at("2025-11-02T08:30:00Z"), "America/Denver")).toBe("2025-11-01"); // 01:30 MST, 2nd time
    expect(nightOf(at("2025-11-02T07:30:00Z"), "America/Denver")).toBe("2025-11-01"); // 01:30 MDT, 1st time
  });

  it("Australia/Sydney (NSW: ends 1st Sunday of April, starts 1st Sunday of October)", () => {
    const apr = nightBounds("2025-04-05", "Australia/Sydney");
    expect(apr.start.toISOString()).toBe("2025-04-05T01:00:00.000Z"); // noon AEDT (UTC+11)
    expect(apr.end.toISOString()).toBe("2025-04-06T02:00:00.000Z"); // noon AEST (UTC+10)
    expect(hours(nightBounds("2025-10-04", "Australia/Sydney"))).toBe(23);
    expect(nightOf(at("2025-04-05T15:30:00Z"), "Australia/Sydney")).toBe("2025-04-05"); // 02:30 AEDT
    expect(nightOf(at("2025-04-05T16:30:00Z"), "Australia/Sydney")).toBe("2025-04-05"); // 02:30 AEST
  });

  it("either side of the date line the same instant falls in different nights", () => {
    // Pacific/Kiritimati UTC+14, Pacific/Pago_Pago UTC−11 (IANA tz database)
    const t = at("2025-06-01T00:00:00Z");
    expect(nightOf(t, "Pacific/Kiritimati")).toBe("2025-06-01"); // 14:00 on 1 June
    expect(nightOf(t, "Pacific/Pago_Pago")).toBe("2025-05-31"); // 13:00 on 31 May
  });

  it("Pacific/Apia skipped 2011-12-30 (IANA tz database): the night of the 29th lasts until noon on the 31st", () => {
    // 2011-12-31 08:00 local (UTC+14) = 2011-12-30T18:00Z
    expect(nightOf(at("2011-12-30T18:00:00Z"), "Pacific/Apia")).toBe("2011-12-29");
    const b = nightBounds("2011-12-29", "Pacific/Apia");
    expect(b.start.toISOString()).toBe("2011-12-29T22:00:00.000Z"); // noon at UTC−10 (DST)
    expect(b.end.toISOString()).toBe("2011-12-30T22:00:00.000Z"); // noon on the 31st at UTC+14
    expect(nightOf(at("2011-12-30T22:00:00Z"), "Pacific/Apia")).toBe("2011-12-31");
  });

  it("nightResolver agrees with nightOf across DST changes", () => {
    for (const zone of ["Europe/Berlin", "America/Denver", "Australia/Sydney", "Pacific/Apia"]) {
      const resolve = nightResolver(zone);
      const start = zone === "Pacific/Apia" ? Date.UTC(2011, 11, 25) : Date.UTC(2025, 2, 1);
      for (let t = start; t < start + 40 * 86_400_000; t += 13 * 60_000) {
        const d = new Date(t);
        expect(resolve(d)).toBe(nightOf(d, zone));
      }
    }
  });

  it("addDays is plain calendar arithmetic", () => {
    expect(addDays("2024-02-28", 1)).toBe("2024-02-29");
    expect(addDays("2025-01-01", -1)).toBe("2024-12-31");
  });
});
