/**
 * Raw-evidence exports over HTTP (lib/briefs/exports.ts), checked against the database itself: the
 * CSV parsed back with csv-parse (the `#` header block skipped as comments) must hold the same rows
 * and values as night_summaries / readings for that station and period, and the GeoJSON must be
 * valid RFC 7946 FeatureCollections.
 */
import { parse } from "csv-parse/sync";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { pool } from "@/db";
import { flagNames } from "@/lib/flags";
import { nightBounds } from "@/ingest/night";
import { anonymous, signInAsRole, type SessionFetch } from "../helpers/session";

const STATION = "hp-north-ridge";
const SITE = "hollow-pine-reserve";
const FROM = "2026-06-01";
const TO = "2026-06-20";

let advocate: SessionFetch;
let stationId: string;
let timeZone: string;

beforeAll(async () => {
  advocate = await signInAsRole("advocate");
  const r = await pool().query<{ id: string; time_zone: string }>("SELECT id, time_zone FROM stations WHERE slug = $1", [STATION]);
  stationId = r.rows[0]!.id;
  timeZone = r.rows[0]!.time_zone;
});
afterAll(async () => {
  await pool().end();
});

async function csv(path: string) {
  const res = await advocate(path);
  expect(res.status, await res.clone().text().then((t) => t.slice(0, 200))).toBe(200);
  expect(res.headers.get("content-type")).toMatch(/^text\/csv/);
  const text = await res.text();
  const comments = text.split("\r\n").filter((l) => l.startsWith("#"));
  const rows = parse(text, { columns: true, comment: "#", skip_empty_lines: true }) as Record<string, string>[];
  return { text, comments, rows };
}
const n = (s: string) => (s === "" ? null : Number(s));

describe("nights.csv", () => {
  it("has the header block: units, screening rules, time zone, version, generation time, query", async () => {
    const { comments } = await csv(`/api/v1/exports/nights.csv?station=${STATION}&from=${FROM}&to=${TO}`);
    const head = comments.join("\n");
    expect(head).toMatch(/Nightmark version: \d+\.\d+\.\d+/);
    expect(head).toMatch(/Generated: \d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}Z/);
    expect(head).toContain(`Query: station=${STATION}&from=${FROM}&to=${TO}`);
    expect(head).toContain("mag/arcsec²");
    expect(head).toContain("degrees");
    expect(head).toContain("UTC, ISO 8601");
    expect(head).toContain(`Time zone: ${timeZone}`);
    expect(head).toMatch(/Screening rules \(site thresholds\).*-18 deg.*0 deg.*15-minute.*0\.25/);
  });

  it("round-trips: the same rows and values as night_summaries for the station and period", async () => {
    const { rows } = await csv(`/api/v1/exports/nights.csv?station=${STATION}&from=${FROM}&to=${TO}`);
    const db = await pool().query(
      `SELECT night::text AS night, readings, usable_readings, median_mag, darkest_sustained_mag, spread_mag, usable_hours, calibration_offset_mag, flag_counts, first_at, last_at
         FROM night_summaries WHERE station_id = $1 AND night BETWEEN $2 AND $3 ORDER BY night`,
      [stationId, FROM, TO],
    );
    expect(rows.length).toBe(db.rows.length);
    expect(rows.length).toBe(20);
    rows.forEach((r, i) => {
      const d = db.rows[i]!;
      expect(r.station).toBe(STATION);
      expect(r.night).toBe(d.night);
      expect(Number(r.readings)).toBe(d.readings);
      expect(Number(r.usable_readings)).toBe(d.usable_readings);
      expect(n(r.median_mag!)).toBe(d.median_mag);
      expect(n(r.darkest_sustained_mag!)).toBe(d.darkest_sustained_mag);
      expect(n(r.spread_mag!)).toBe(d.spread_mag);
      expect(Number(r.usable_hours)).toBe(d.usable_hours);
      expect(Number(r.calibration_offset_mag)).toBe(d.calibration_offset_mag);
      expect(Number(r.moonlit)).toBe(d.flag_counts.moonlit ?? 0);
      expect(Number(r.twilight)).toBe(d.flag_counts.twilight ?? 0);
      expect(Number(r.cloud_suspect)).toBe(d.flag_counts.cloudSuspect ?? 0);
      expect(r.first_at).toBe(d.first_at?.toISOString() ?? "");
      expect(r.last_at).toBe(d.last_at?.toISOString() ?? "");
    });
  });
});

describe("readings.csv", () => {
  it("round-trips: the same readings, flags as names, sun and moon altitudes, UTC ISO 8601 times", async () => {
    const { rows } = await csv(`/api/v1/exports/readings.csv?station=${STATION}&from=${FROM}&to=${TO}`);
    // The period's nights run from local noon on FROM to local noon after TO (ingest/night.ts).
    const db = await pool().query(
      `SELECT taken_at, mag, temp_c, sun_alt_deg, moon_alt_deg, moon_fraction, flags, source::text AS source FROM readings
        WHERE station_id = $1 AND taken_at >= $2 AND taken_at < $3 ORDER BY taken_at`,
      [stationId, nightBounds(FROM, timeZone).start, nightBounds(TO, timeZone).end],
    );
    expect(db.rows.length).toBeGreaterThan(1000);
    expect(rows.length).toBe(db.rows.length);
    rows.forEach((r, i) => {
      const d = db.rows[i]!;
      expect(r.taken_at).toBe((d.taken_at as Date).toISOString());
      expect(Number(r.mag)).toBe(d.mag);
      expect(n(r.temp_c!)).toBe(d.temp_c);
      expect(Number(r.sun_alt_deg)).toBe(d.sun_alt_deg);
      expect(Number(r.moon_alt_deg)).toBe(d.moon_alt_deg);
      expect(Number(r.moon_fraction)).toBe(d.moon_fraction);
      expect(r.flags).toBe(flagNames(d.flags).join("|"));
      expect(r.usable).toBe(String(d.flags === 0));
      expect(r.source).toBe(d.source);
    });
  });

  it("streams a whole year of a site (every station) without losing or repeating a row", async () => {
    const res = await advocate(`/api/v1/exports/readings.csv?site=${SITE}&from=2025-12-01&to=2026-11-30`);
    expect(res.status).toBe(200);
    const text = await res.text();
    const lines = text.split("\r\n").filter((l) => l && !l.startsWith("#"));
    const keys = new Set(lines.slice(1).map((l) => l.split(",", 2).join(",")));
    const db = await pool().query<{ n: number }>(
      `SELECT count(*)::int AS n FROM readings r JOIN stations st ON st.id = r.station_id JOIN sites si ON si.id = st.site_id
        WHERE si.slug = $1 AND r.taken_at >= $2 AND r.taken_at < $3`,
      [SITE, nightBounds("2025-12-01", "America/Denver").start, nightBounds("2026-11-30", "America/Denver").end],
    );
    expect(lines.length - 1).toBe(db.rows[0]!.n);
    expect(keys.size).toBe(db.rows[0]!.n);
  });

  it("answers with clear errors: no site or station, a station signed out, a private site signed out", async () => {
    const bad = await advocate("/api/v1/exports/readings.csv?from=2026-01-01");
    expect(bad.status).toBe(400);
    expect(((await bad.json()) as { error: { message: string } }).error.message).toMatch(/site= or station=/);
    expect((await anonymous()(`/api/v1/exports/readings.csv?station=${STATION}`)).status).toBe(401);
    expect((await anonymous()("/api/v1/exports/nights.csv?site=marrow-hill-common")).status).toBe(404);
    expect((await anonymous()(`/api/v1/exports/nights.csv?site=${SITE}&from=2026-11-01&to=2026-11-02`)).status).toBe(200);
  });
});

describe("GeoJSON", () => {
  const inRange = ([lon, lat]: number[]) => lon! >= -180 && lon! <= 180 && lat! >= -90 && lat! <= 90;

  it("stations.geojson is a FeatureCollection of Points [lon, lat] (RFC 7946 §3.1.2)", async () => {
    const res = await advocate(`/api/v1/exports/stations.geojson?site=${SITE}`);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/application\/geo\+json/);
    const fc = (await res.json()) as { type: string; features: { type: string; geometry: { type: string; coordinates: number[] }; properties: { slug: string } }[] };
    expect(fc.type).toBe("FeatureCollection");
    // The site's four demo stations; other tests may register and approve more inside it.
    expect(fc.features.map((f) => f.properties.slug)).toEqual(
      expect.arrayContaining(["hp-east-mesa", "hp-juniper-flat", "hp-north-ridge", "hp-ranger-post"]),
    );
    expect(fc.features.filter((f) => !f.properties.slug.startsWith("hp-") && !f.properties.slug.startsWith("test-"))).toEqual([]);
    for (const f of fc.features) {
      expect(f.type).toBe("Feature");
      expect(f.geometry.type).toBe("Point");
      expect(f.geometry.coordinates).toHaveLength(2);
      expect(inRange(f.geometry.coordinates)).toBe(true);
    }
    const st = fc.features.find((f) => f.properties.slug === STATION)!;
    const db = await pool().query<{ lat: number; lon: number }>("SELECT lat, lon FROM stations WHERE slug = $1", [STATION]);
    expect(st.geometry.coordinates).toEqual([db.rows[0]!.lon, db.rows[0]!.lat]);
  });

  it("sites.geojson holds closed polygon rings; signed out only public sites", async () => {
    const fc = (await (await advocate("/api/v1/exports/sites.geojson")).json()) as { type: string; features: { geometry: { type: string; coordinates: number[][][] }; properties: { slug: string; isPublic: boolean } }[] };
    expect(fc.type).toBe("FeatureCollection");
    expect(fc.features.length).toBeGreaterThan(0);
    for (const f of fc.features) {
      expect(["Polygon", "MultiPolygon"]).toContain(f.geometry.type);
      const rings = f.geometry.type === "Polygon" ? f.geometry.coordinates : (f.geometry.coordinates as unknown as number[][][][]).flat();
      for (const ring of rings) {
        expect(ring.length).toBeGreaterThanOrEqual(4);
        expect(ring[0]).toEqual(ring[ring.length - 1]); // RFC 7946 §3.1.6: a linear ring is closed
        expect(ring.every(inRange)).toBe(true);
      }
    }
    const anon = (await (await anonymous()("/api/v1/exports/sites.geojson")).json()) as { features: { properties: { isPublic: boolean } }[] };
    expect(anon.features.every((f) => f.properties.isPublic)).toBe(true);
  });
});
