/**
 * Validation of an uploaded site boundary (GeoJSON). Accepts a Polygon or MultiPolygon geometry, or a
 * Feature / one-feature FeatureCollection holding one. Every problem names the polygon, ring and
 * position it was found at (1-based, as a person counts), so the steward can find it in the file.
 */
import type { MultiPolygon, Polygon, Position } from "geojson";

export type BoundaryResult = { ok: true; boundary: Polygon | MultiPolygon } | { ok: false; errors: string[] };

const MAX_ERRORS = 20;

function unwrap(value: unknown): { geometry?: unknown; error?: string } {
  if (!value || typeof value !== "object") return { error: "The file is not a GeoJSON object." };
  const v = value as { type?: unknown; geometry?: unknown; features?: unknown };
  if (v.type === "FeatureCollection") {
    const fs = Array.isArray(v.features) ? v.features : [];
    if (fs.length !== 1) return { error: `A FeatureCollection must hold exactly one feature (this one has ${fs.length}).` };
    return unwrap(fs[0]);
  }
  if (v.type === "Feature") {
    if (!v.geometry) return { error: "The Feature has no geometry." };
    return { geometry: v.geometry };
  }
  return { geometry: value };
}

function checkRing(ring: unknown, where: string, errors: string[]) {
  if (!Array.isArray(ring)) {
    errors.push(`${where}: is not an array of positions.`);
    return;
  }
  if (ring.length < 4) errors.push(`${where}: has ${ring.length} positions; a ring needs at least 4 (3 corners and the first repeated).`);
  ring.forEach((p: unknown, i: number) => {
    if (errors.length >= MAX_ERRORS) return;
    const pos = p as Position;
    if (!Array.isArray(pos) || pos.length < 2 || !pos.slice(0, 2).every((n) => typeof n === "number" && Number.isFinite(n))) {
      errors.push(`${where}, position ${i + 1}: must be [longitude, latitude] numbers.`);
      return;
    }
    const [lon, lat] = pos as [number, number];
    if (lon < -180 || lon > 180) errors.push(`${where}, position ${i + 1}: longitude ${lon} is outside −180…180.`);
    if (lat < -90 || lat > 90) errors.push(`${where}, position ${i + 1}: latitude ${lat} is outside −90…90 (are longitude and latitude swapped?).`);
  });
  const first = ring[0] as Position | undefined;
  const last = ring[ring.length - 1] as Position | undefined;
  if (ring.length >= 2 && Array.isArray(first) && Array.isArray(last) && (first[0] !== last[0] || first[1] !== last[1])) {
    errors.push(`${where}: is not closed (the last position must repeat the first, [${first.slice(0, 2).join(", ")}]).`);
  }
}

function checkPolygon(rings: unknown, label: string, errors: string[]) {
  if (!Array.isArray(rings) || rings.length === 0) {
    errors.push(`${label}: has no rings.`);
    return;
  }
  rings.forEach((ring, r) => checkRing(ring, `${label}ring ${r + 1}${r === 0 ? " (outer)" : " (hole)"}`, errors));
}

export function validateBoundary(value: unknown): BoundaryResult {
  const { geometry, error } = unwrap(value);
  if (error) return { ok: false, errors: [error] };
  const g = geometry as { type?: unknown; coordinates?: unknown };
  const errors: string[] = [];
  if (g.type === "Polygon") {
    checkPolygon(g.coordinates, "", errors);
  } else if (g.type === "MultiPolygon") {
    if (!Array.isArray(g.coordinates) || g.coordinates.length === 0) errors.push("The MultiPolygon has no polygons.");
    else g.coordinates.forEach((poly, i) => checkPolygon(poly, `polygon ${i + 1}, `, errors));
  } else {
    return { ok: false, errors: [`The geometry must be a Polygon or MultiPolygon (got ${String(g.type ?? "nothing")}).`] };
  }
  if (errors.length > 0) return { ok: false, errors: errors.slice(0, MAX_ERRORS).map((e) => e[0]!.toUpperCase() + e.slice(1)) };
  const clean = g.type === "Polygon"
    ? ({ type: "Polygon", coordinates: g.coordinates as Position[][] } satisfies Polygon)
    : ({ type: "MultiPolygon", coordinates: g.coordinates as Position[][][] } satisfies MultiPolygon);
  return { ok: true, boundary: clean };
}

/** Parses the text of an uploaded file, then validates it. */
export function parseBoundaryText(text: string): BoundaryResult {
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (err) {
    return { ok: false, errors: [`The file is not valid JSON: ${(err as Error).message}`] };
  }
  return validateBoundary(value);
}

/** An IANA time zone name that this runtime's Intl knows. */
export function isValidTimeZone(tz: string): boolean {
  if (!tz || !/^[A-Za-z_+\-/0-9]+$/.test(tz)) return false;
  try {
    new Intl.DateTimeFormat("en", { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}
