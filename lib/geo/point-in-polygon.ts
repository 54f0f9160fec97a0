import type { MultiPolygon, Polygon, Position } from "geojson";

/**
 * Ray casting (even–odd rule) on a ring of [lon, lat] positions, treating coordinates as planar.
 * Site boundaries are a few kilometres across, so the planar approximation is far below the
 * precision of a typed or clicked position. Points exactly on an edge count as inside.
 */
export function pointInRing(lon: number, lat: number, ring: Position[]): boolean {
  let inside = false;
  const n = ring.length;
  for (let i = 0, j = n - 1; i < n; j = i++) {
    const [xi, yi] = ring[i] as [number, number];
    const [xj, yj] = ring[j] as [number, number];
    if (onSegment(lon, lat, xi, yi, xj, yj)) return true;
    const crosses = yi > lat !== yj > lat && lon < ((xj - xi) * (lat - yi)) / (yj - yi) + xi;
    if (crosses) inside = !inside;
  }
  return inside;
}

function onSegment(px: number, py: number, x1: number, y1: number, x2: number, y2: number): boolean {
  const cross = (px - x1) * (y2 - y1) - (py - y1) * (x2 - x1);
  if (Math.abs(cross) > 1e-12) return false;
  return px >= Math.min(x1, x2) - 1e-12 && px <= Math.max(x1, x2) + 1e-12 && py >= Math.min(y1, y2) - 1e-12 && py <= Math.max(y1, y2) + 1e-12;
}

/** GeoJSON polygon: inside the outer ring and not inside any hole. */
export function pointInPolygon(lon: number, lat: number, polygon: Polygon | MultiPolygon): boolean {
  const polys = polygon.type === "Polygon" ? [polygon.coordinates] : polygon.coordinates;
  return polys.some((rings) => {
    const [outer, ...holes] = rings;
    if (!outer || !pointInRing(lon, lat, outer)) return false;
    // A point on a hole's edge is on the polygon's boundary, so it stays inside.
    return !holes.some((h) => pointInRing(lon, lat, h) && !onAnyEdge(lon, lat, h));
  });
}

function onAnyEdge(lon: number, lat: number, ring: Position[]): boolean {
  for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) {
    const [xi, yi] = ring[i] as [number, number];
    const [xj, yj] = ring[j] as [number, number];
    if (onSegment(lon, lat, xi, yi, xj, yj)) return true;
  }
  return false;
}
