/**
 * The raw evidence behind a brief, as downloads: night summaries and readings as CSV (streamed in
 * keyset pages, never a whole year in memory), stations and sites as GeoJSON.
 *
 * CSV: a block of `#` lines first (units, screening rules, time zone, Nightmark version, generation
 * time, the query), then a header row and the rows, CRLF line ends (RFC 4180), empty cell = no value.
 * Visibility: sites through findSiteForViewer (lib/sites/access.ts; signed-out callers: public sites,
 * approved stations); stations through canViewStation (lib/stations/access.ts, signed in).
 */
import { sql } from "drizzle-orm";
import type { Feature, FeatureCollection, MultiPolygon, Point, Polygon } from "geojson";
import { z } from "zod";
import { pool } from "@/db";
import type { Ctx } from "@/lib/auth/guard";
import { requireUser } from "@/lib/auth/guard";
import { badRequest, notFound } from "@/lib/errors";
import { flagNames } from "@/lib/flags";
import { findSiteForViewer, roundPosition, siteVisibleSql, stationVisibleSql } from "@/lib/sites/access";
import { USABLE_NIGHT_MIN_READINGS } from "@/lib/sites/darkness";
import { canViewStation, loadStation, stationThresholds } from "@/lib/stations/access";
import { addDays, nightBounds } from "@/ingest/night";
import { NIGHTMARK_VERSION } from "./version";
import { csvCell } from "@/lib/csv";

const dateRe = /^\d{4}-\d{2}-\d{2}$/;
const slug = z.string().regex(/^[a-z0-9-]{1,80}$/, "must be a slug");

export const exportQuerySchema = z
  .object({
    site: slug.optional(),
    station: slug.optional(),
    from: z.string().regex(dateRe, "from must be YYYY-MM-DD").optional(),
    to: z.string().regex(dateRe, "to must be YYYY-MM-DD").optional(),
  })
  .refine((q) => !!q.site !== !!q.station, { message: "Give site= or station= (exactly one)", path: ["site"] })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { message: "to must be on or after from", path: ["to"] });
export type ExportQuery = z.infer<typeof exportQuerySchema>;

export const MAX_EXPORT_DAYS = 3660;
const PAGE_ROWS = 5000;

type Thresholds = { sunMaxAltDeg: number; moonMaxAltDeg: number; cloudWindowMin: number; cloudSpreadMag: number };
type ExportStation = { id: string; slug: string; name: string; timeZone: string; approval: string };

export type ExportScope = {
  label: string;
  query: string;
  from: string;
  to: string;
  timeZone: string;
  thresholds: Thresholds;
  stations: ExportStation[];
  filenameStem: string;
};

/** Which stations and nights an export covers, after checking the caller may see them. */
export async function resolveExportScope({ ctx, input }: { ctx: Ctx; input: Record<string, string | undefined> }): Promise<ExportScope> {
  const q = exportQuerySchema.parse(input);
  const today = new Date().toISOString().slice(0, 10);
  const to = q.to ?? today;
  const from = q.from ?? addDays(to, -365);
  if ((Date.parse(to) - Date.parse(from)) / 86_400_000 > MAX_EXPORT_DAYS) throw badRequest(`from: an export covers at most ${MAX_EXPORT_DAYS} nights.`);
  const query = `${q.site ? `site=${q.site}` : `station=${q.station}`}&from=${from}&to=${to}`;
  if (q.station) {
    requireUser(ctx);
    const loaded = await loadStation(ctx, q.station);
    if (!loaded || !(await canViewStation(ctx, { ...loaded.station, site: loaded.site }))) throw notFound("The station");
    const st = loaded.station;
    return {
      label: `station ${st.name} (${st.slug})${loaded.site ? ` of site ${loaded.site.name} (${loaded.site.slug})` : ""}`,
      query,
      from,
      to,
      timeZone: st.timeZone,
      thresholds: stationThresholds(loaded),
      stations: [{ id: st.id, slug: st.slug, name: st.name, timeZone: st.timeZone, approval: st.approval }],
      filenameStem: `${st.slug}-${from}-${to}`,
    };
  }
  const { site, mode } = await findSiteForViewer({ ctx, input: { slug: q.site! } });
  const visible = mode === "public" ? sql`st.approval = 'approved'` : stationVisibleSql(ctx.user);
  const rows = await ctx.db.execute<{ id: string; slug: string; name: string; time_zone: string; approval: string }>(sql`
    SELECT st.id, st.slug, st.name, st.time_zone, st.approval FROM stations st JOIN sites si ON si.id = st.site_id
     WHERE st.site_id = ${site.id}::uuid AND ${visible} ORDER BY st.slug`);
  return {
    label: `site ${site.name} (${site.slug})`,
    query,
    from,
    to,
    timeZone: site.timeZone,
    thresholds: { sunMaxAltDeg: site.sunMaxAltDeg, moonMaxAltDeg: site.moonMaxAltDeg, cloudWindowMin: site.cloudWindowMin, cloudSpreadMag: site.cloudSpreadMag },
    stations: rows.rows.map((r) => ({ id: r.id, slug: r.slug, name: r.name, timeZone: r.time_zone, approval: r.approval })),
    filenameStem: `${site.slug}-${from}-${to}`,
  };
}

/** RFC 4180 cell, quoted also when it starts with '#' (kept apart from the header block's lines). */
export const exportCell = (v: unknown) => csvCell(v, { commentSafe: true });
const csvLine = (cells: unknown[]) => `${cells.map(exportCell).join(",")}\r\n`;

function headerBlock(kind: string, scope: ExportScope, columns: readonly string[], extra: string[] = []): string {
  const t = scope.thresholds;
  const lines = [
    `Nightmark export: ${kind}`,
    `Nightmark version: ${NIGHTMARK_VERSION}`,
    `Generated: ${new Date().toISOString()} (UTC)`,
    `Query: ${scope.query}`,
    `Covers: ${scope.label}; nights ${scope.from} to ${scope.to} (a night runs from local noon to local noon and is named by its evening date)`,
    `Time zone: ${scope.timeZone} (nights); every time in this file is UTC, ISO 8601`,
    `Units: sky brightness in mag/arcsec² (V band; bigger = darker); altitudes in degrees; moon_fraction 0-1; temperatures in °C`,
    `Screening rules (site thresholds): usable = no flag; twilight when the Sun's geometric altitude is at or above ${t.sunMaxAltDeg} deg; daylight at or above 0 deg; moonlit when the Moon is at or above ${t.moonMaxAltDeg} deg; cloud-suspect when readings within a ${t.cloudWindowMin}-minute window vary by more than ${t.cloudSpreadMag} mag/arcsec²; out-of-range outside the meter's calibrated range`,
    `A station's night counts toward its site when the station is approved and the night has a median from at least ${USABLE_NIGHT_MIN_READINGS} usable readings`,
    `Stations: ${scope.stations.map((s) => `${s.slug} (${s.timeZone}, ${s.approval})`).join("; ") || "none visible"}`,
    ...extra,
    `Columns: ${columns.join(", ")}`,
  ];
  return lines.map((l) => `# ${l.replace(/[\r\n]+/g, " ")}\r\n`).join("");
}

/** A ReadableStream of text that asks `next()` for one chunk at a time (null = end). */
function textStream(next: () => Promise<string | null>): ReadableStream<Uint8Array> {
  const enc = new TextEncoder();
  return new ReadableStream<Uint8Array>({
    async pull(controller) {
      try {
        const chunk = await next();
        if (chunk === null) controller.close();
        else controller.enqueue(enc.encode(chunk));
      } catch (err) {
        console.error("[exports] stream failed", (err as Error).message);
        controller.error(err);
      }
    },
  });
}

export const NIGHT_EXPORT_COLUMNS = [
  "station", "night", "readings", "usable_readings", "median_mag", "darkest_sustained_mag", "spread_mag", "usable_hours",
  "calibration_offset_mag", "daylight", "twilight", "moonlit", "cloud_suspect", "out_of_range", "first_at", "last_at", "counts_toward_site",
] as const;

const iso = (v: Date | string | null) => (v === null ? null : new Date(v).toISOString());

export function nightsCsvStream(scope: ExportScope): ReadableStream<Uint8Array> {
  let header: string | null = headerBlock("night summaries", scope, NIGHT_EXPORT_COLUMNS, [
    "Values: medians are calibrated (raw + calibration_offset_mag); flag columns count readings with that flag (a reading can carry several)",
  ]) + csvLine([...NIGHT_EXPORT_COLUMNS]);
  let i = 0;
  let after: string | null = null;
  return textStream(async () => {
    if (header !== null) {
      const h = header;
      header = null;
      return h;
    }
    while (i < scope.stations.length) {
      const st = scope.stations[i]!;
      const r = await pool().query<{
        night: string; readings: number; usable_readings: number; median_mag: number | null; darkest_sustained_mag: number | null; spread_mag: number | null;
        usable_hours: number; calibration_offset_mag: number; flag_counts: Record<string, number>; first_at: Date | null; last_at: Date | null;
      }>(
        `SELECT night::text AS night, readings, usable_readings, median_mag, darkest_sustained_mag, spread_mag, usable_hours, calibration_offset_mag,
                flag_counts, first_at, last_at
           FROM night_summaries WHERE station_id = $1 AND night >= $2::date AND night <= $3::date AND ($4::date IS NULL OR night > $4::date)
          ORDER BY night LIMIT ${PAGE_ROWS}`,
        [st.id, scope.from, scope.to, after],
      );
      if (r.rows.length < PAGE_ROWS) {
        i++;
        after = null;
      } else after = r.rows[r.rows.length - 1]!.night;
      if (r.rows.length === 0) continue;
      return r.rows
        .map((n) => {
          const f = n.flag_counts ?? {};
          const counts = st.approval === "approved" && n.median_mag !== null && n.usable_readings >= USABLE_NIGHT_MIN_READINGS;
          return csvLine([
            st.slug, n.night, n.readings, n.usable_readings, n.median_mag, n.darkest_sustained_mag, n.spread_mag, n.usable_hours, n.calibration_offset_mag,
            f.daylight ?? 0, f.twilight ?? 0, f.moonlit ?? 0, f.cloudSuspect ?? 0, f.outOfRange ?? 0, iso(n.first_at), iso(n.last_at), counts,
          ]);
        })
        .join("");
    }
    return null;
  });
}

export const READING_EXPORT_COLUMNS = [
  "station", "taken_at", "mag", "temp_c", "sun_alt_deg", "moon_alt_deg", "moon_fraction", "flags", "usable", "source", "upload_id",
] as const;

/** SQL for the flag names of `flags`, "|"-separated, from lib/flags.ts (so the two never disagree). */
const FLAG_BITS = [1, 2, 4, 8, 16].map((bit) => ({ bit, name: flagNames(bit)[0]! }));

export function readingsCsvStream(scope: ExportScope): ReadableStream<Uint8Array> {
  let header: string | null = headerBlock("readings", scope, READING_EXPORT_COLUMNS, [
    `Values: mag is the raw meter value (calibration offsets are not applied to readings); flags are names separated by "|" (${FLAG_BITS.map((f) => f.name).join(", ")}), empty when usable; sun/moon altitudes are geometric (unrefracted), computed with suncalc at the station's position`,
  ]) + csvLine([...READING_EXPORT_COLUMNS]);
  let i = 0;
  let after: string | null = null;
  return textStream(async () => {
    if (header !== null) {
      const h = header;
      header = null;
      return h;
    }
    while (i < scope.stations.length) {
      const st = scope.stations[i]!;
      const start = nightBounds(scope.from, st.timeZone).start.toISOString();
      const end = nightBounds(scope.to, st.timeZone).end.toISOString();
      const r = await pool().query<{
        k: string; at: string; mag: number; temp_c: number | null; sun_alt_deg: number; moon_alt_deg: number; moon_fraction: number; flags: number; source: string; upload_id: string | null;
      }>(
        `SELECT taken_at::text AS k, to_char(taken_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"') AS at, mag, temp_c, sun_alt_deg, moon_alt_deg, moon_fraction,
                flags, source::text AS source, upload_id
           FROM readings WHERE station_id = $1 AND taken_at >= $2::timestamptz AND taken_at < $3::timestamptz AND ($4::timestamptz IS NULL OR taken_at > $4::timestamptz)
          ORDER BY taken_at LIMIT ${PAGE_ROWS}`,
        [st.id, start, end, after],
      );
      if (r.rows.length < PAGE_ROWS) {
        i++;
        after = null;
      } else after = r.rows[r.rows.length - 1]!.k;
      if (r.rows.length === 0) continue;
      return r.rows
        .map((x) =>
          csvLine([st.slug, x.at, x.mag, x.temp_c, x.sun_alt_deg, x.moon_alt_deg, x.moon_fraction, flagNames(Number(x.flags)).join("|"), Number(x.flags) === 0, x.source, x.upload_id]),
        )
        .join("");
    }
    return null;
  });
}

export function csvResponse(stream: ReadableStream<Uint8Array>, filename: string): Response {
  return new Response(stream, {
    headers: {
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Disposition": `attachment; filename="${filename}"`,
      "Cache-Control": "private, no-store",
      "X-Content-Type-Options": "nosniff",
    },
  });
}

// ---------------------------------------------------------------------------------------------
// GeoJSON
// ---------------------------------------------------------------------------------------------

const geoQuerySchema = z.object({ site: slug.optional() });

export async function stationsGeoJson({ ctx, input }: { ctx: Ctx; input: Record<string, string | undefined> }): Promise<FeatureCollection<Point>> {
  const q = geoQuerySchema.parse(input);
  const rows = await ctx.db.execute<{
    slug: string; name: string; lat: number; lon: number; elevation_m: number | null; time_zone: string; status: string; approval: string;
    site_slug: string | null; site_name: string | null; round: boolean | null;
  }>(sql`
    SELECT st.slug, st.name, st.lat, st.lon, st.elevation_m, st.time_zone, st.status, st.approval, si.slug AS site_slug, si.name AS site_name,
           si.round_public_positions AS round
      FROM stations st LEFT JOIN sites si ON si.id = st.site_id
     WHERE ${stationVisibleSql(ctx.user)} ${q.site ? sql`AND si.slug = ${q.site}` : sql``}
     ORDER BY st.slug`);
  const features: Feature<Point>[] = rows.rows.map((r) => {
    // Signed-out callers see public sites' stations with the rounding the site asks for.
    const rounded = !ctx.user && !!r.round;
    const pos = rounded ? roundPosition(Number(r.lat), Number(r.lon)) : { lat: Number(r.lat), lon: Number(r.lon) };
    return {
      type: "Feature",
      geometry: { type: "Point", coordinates: [pos.lon, pos.lat] },
      properties: {
        slug: r.slug, name: r.name, site: r.site_slug, siteName: r.site_name, status: r.status, approval: r.approval,
        elevationM: r.elevation_m === null ? null : Number(r.elevation_m), timeZone: r.time_zone, positionRounded: rounded,
      },
    };
  });
  return { type: "FeatureCollection", features };
}

export async function sitesGeoJson({ ctx, input }: { ctx: Ctx; input: Record<string, string | undefined> }): Promise<FeatureCollection<Polygon | MultiPolygon>> {
  const q = geoQuerySchema.parse(input);
  const rows = await ctx.db.execute<{
    slug: string; name: string; boundary: Polygon | MultiPolygon; time_zone: string; target_mag: number; natural_sky_mag: number; is_public: boolean;
    lighting_zone: string | null; sun_max_alt_deg: number; moon_max_alt_deg: number; cloud_window_min: number; cloud_spread_mag: number;
  }>(sql`
    SELECT si.slug, si.name, si.boundary, si.time_zone, si.target_mag, si.natural_sky_mag, si.is_public, si.lighting_zone,
           si.sun_max_alt_deg, si.moon_max_alt_deg, si.cloud_window_min, si.cloud_spread_mag
      FROM sites si WHERE ${siteVisibleSql(ctx.user)} ${q.site ? sql`AND si.slug = ${q.site}` : sql``} ORDER BY si.slug`);
  return {
    type: "FeatureCollection",
    features: rows.rows.map((r) => ({
      type: "Feature",
      geometry: r.boundary,
      properties: {
        slug: r.slug, name: r.name, timeZone: r.time_zone, targetMag: Number(r.target_mag), naturalSkyMag: Number(r.natural_sky_mag), isPublic: r.is_public,
        lightingZone: r.lighting_zone,
        thresholds: { sunMaxAltDeg: Number(r.sun_max_alt_deg), moonMaxAltDeg: Number(r.moon_max_alt_deg), cloudWindowMin: Number(r.cloud_window_min), cloudSpreadMag: Number(r.cloud_spread_mag) },
      },
    })),
  };
}

export function geoJsonResponse(body: unknown, filename: string): Response {
  return new Response(JSON.stringify(body), {
    headers: { "Content-Type": "application/geo+json; charset=utf-8", "Content-Disposition": `attachment; filename="${filename}"`, "Cache-Control": "private, max-age=60" },
  });
}
