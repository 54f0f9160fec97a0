/**
 * The app's own vector tiles: boundary layers cut with geojson-vt and encoded as Mapbox Vector
 * Tiles (protobuf) with vt-pbf. The tile indices are built once per process on first use; encoded
 * tiles are kept in a bounded LRU so a warm tile is a map lookup.
 */
import { GeoJSONVT } from "@maplibre/geojson-vt";
import { fromGeojsonVt } from "@maplibre/vt-pbf";
import type { GeoJSONVTTile } from "@maplibre/geojson-vt";
import { loadBoundaryLayers } from "./boundaries";

export const TILE_LAYERS = ["land", "borders", "admin"] as const;
export type TileLayer = (typeof TILE_LAYERS)[number];
export const TILE_MIN_ZOOM = 0;
export const TILE_MAX_ZOOM = 14;
const EXTENT = 4096;
const LRU_MAX = 4_000;

type Indices = Record<TileLayer, GeoJSONVT>;

const g = globalThis as unknown as { __nmTileIndices?: Indices; __nmTileCache?: Map<string, Uint8Array> };

function indices(): Indices {
  if (!g.__nmTileIndices) {
    const layers = loadBoundaryLayers();
    const opts = { maxZoom: TILE_MAX_ZOOM, indexMaxZoom: 5, tolerance: 3, extent: EXTENT, buffer: 64 };
    g.__nmTileIndices = {
      land: new GeoJSONVT(layers.land, opts),
      borders: new GeoJSONVT(layers.borders, opts),
      admin: new GeoJSONVT(layers.admin, opts),
    };
  }
  return g.__nmTileIndices;
}

function cache(): Map<string, Uint8Array> {
  if (!g.__nmTileCache) g.__nmTileCache = new Map();
  return g.__nmTileCache;
}

export function isValidTile(z: number, x: number, y: number): boolean {
  if (![z, x, y].every(Number.isInteger)) return false;
  if (z < TILE_MIN_ZOOM || z > TILE_MAX_ZOOM) return false;
  const n = 2 ** z;
  return x >= 0 && x < n && y >= 0 && y < n;
}

/** The encoded tile (possibly with no layers: an empty tile is a valid, zero-length protobuf). */
export function getTile(z: number, x: number, y: number): Uint8Array {
  const key = `${z}/${x}/${y}`;
  const c = cache();
  const hit = c.get(key);
  if (hit) {
    c.delete(key);
    c.set(key, hit);
    return hit;
  }
  const idx = indices();
  const layers: Record<string, GeoJSONVTTile> = {};
  for (const name of TILE_LAYERS) {
    const t = idx[name].getTile(z, x, y);
    if (t && t.features.length > 0) layers[name] = t;
  }
  const pbf = Object.keys(layers).length > 0 ? fromGeojsonVt(layers, { version: 2, extent: EXTENT }) : new Uint8Array(0);
  c.set(key, pbf);
  if (c.size > LRU_MAX) {
    const oldest = c.keys().next().value;
    if (oldest !== undefined) c.delete(oldest);
  }
  return pbf;
}

/** Builds the indices ahead of the first request (optional; getTile builds them lazily). */
export function warmTiles(): void {
  indices();
}
