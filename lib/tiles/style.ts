/**
 * The MapLibre style for the base map. Colours here are the dark theme's token values; every layer
 * names its design token in `metadata["nm:token"]` so the client replaces them with the computed CSS
 * variables at run time (night mode turns the whole map red). No glyphs or sprites: labels are HTML.
 */
import type { StyleSpecification } from "maplibre-gl";
import { TILE_MAX_ZOOM, TILE_MIN_ZOOM } from "./index";

/** Token name → [paint property, opacity] for each base layer. */
export type TokenMeta = { "nm:token": string; "nm:prop": string; "nm:alpha"?: number };

export function baseStyle(origin: string): StyleSpecification {
  const meta = (token: string, prop: string, alpha?: number): TokenMeta =>
    alpha === undefined ? { "nm:token": token, "nm:prop": prop } : { "nm:token": token, "nm:prop": prop, "nm:alpha": alpha };
  return {
    version: 8,
    name: "Nightmark base",
    sources: {
      base: {
        type: "vector",
        tiles: [`${origin}/api/tiles/{z}/{x}/{y}`],
        minzoom: TILE_MIN_ZOOM,
        maxzoom: TILE_MAX_ZOOM,
        attribution: "Natural Earth (public domain) · US Census Bureau (public domain)",
      },
    },
    layers: [
      { id: "background", type: "background", paint: { "background-color": "rgb(11, 14, 23)" }, metadata: meta("bg", "background-color") },
      {
        id: "land",
        type: "fill",
        source: "base",
        "source-layer": "land",
        paint: { "fill-color": "rgb(18, 23, 36)" },
        metadata: meta("surface", "fill-color"),
      },
      {
        id: "county-lines",
        type: "line",
        source: "base",
        "source-layer": "admin",
        minzoom: 6,
        filter: ["==", ["get", "kind"], "county"],
        paint: { "line-color": "rgba(45, 53, 76, 0.8)", "line-width": 0.6, "line-dasharray": [3, 2] },
        metadata: meta("line", "line-color", 0.8),
      },
      {
        id: "state-lines",
        type: "line",
        source: "base",
        "source-layer": "admin",
        minzoom: 3,
        filter: ["==", ["get", "kind"], "state"],
        paint: { "line-color": "rgb(148, 156, 178)", "line-width": ["interpolate", ["linear"], ["zoom"], 3, 0.5, 10, 1.5] },
        metadata: meta("muted", "line-color", 0.7),
      },
      {
        id: "country-lines",
        type: "line",
        source: "base",
        "source-layer": "borders",
        paint: { "line-color": "rgb(148, 156, 178)", "line-width": ["interpolate", ["linear"], ["zoom"], 1, 0.6, 10, 2] },
        metadata: meta("muted", "line-color"),
      },
    ],
  };
}
