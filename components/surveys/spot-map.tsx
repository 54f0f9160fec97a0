"use client";

/**
 * The survey form's map: click to place the active spot; every spot is a numbered marker. Uses the
 * app's base style (/api/tiles/style.json, recoloured with the design tokens from each layer's
 * metadata) when it loads, else a plain background; the sites' boundaries are drawn on top either
 * way. The typed latitude/longitude fields and "use my location" are the keyboard and screen-reader
 * way to do the same; the map is an aid. Load with next/dynamic and ssr: false.
 */
import "maplibre-gl/dist/maplibre-gl.css";
import * as maplibregl from "maplibre-gl";
import type { LayerSpecification, StyleSpecification } from "maplibre-gl";
import type { FeatureCollection, MultiPolygon, Polygon } from "geojson";
import { useEffect, useMemo, useState } from "react";
import MapGL, { Layer, Marker, NavigationControl, Source, type MapLayerMouseEvent } from "react-map-gl/maplibre";
import { useThemeTokens, type ThemeTokens } from "@/components/map/use-theme-tokens";

// Turbopack cannot bundle MapLibre's worker: scripts/copy-maplibre-worker.mjs puts it in public/.
maplibregl.setWorkerUrl("/maplibre-gl-worker.mjs");

export type SpotMapSite = { id: string; name: string; boundary: Polygon | MultiPolygon };
export type SpotMapProps = {
  spots: { lat: number | null; lon: number | null }[];
  active: number;
  sites: SpotMapSite[];
  onPick: (lat: number, lon: number) => void;
};

function recolour(style: StyleSpecification, t: ThemeTokens): StyleSpecification {
  const layers = style.layers.map((l) => {
    const m = (l as { metadata?: Record<string, unknown> }).metadata;
    const token = m?.["nm:token"];
    const prop = m?.["nm:prop"];
    if (typeof token !== "string" || typeof prop !== "string") return l;
    const alpha = typeof m?.["nm:alpha"] === "number" ? (m["nm:alpha"] as number) : 1;
    const paint = { ...((l as { paint?: Record<string, unknown> }).paint ?? {}), [prop]: t.rgba(token, alpha) };
    return { ...l, paint } as LayerSpecification;
  });
  return { ...style, layers };
}

export function SpotMap({ spots, active, sites, onPick }: SpotMapProps) {
  const t = useThemeTokens();
  const [base, setBase] = useState<StyleSpecification | null | undefined>(undefined);
  useEffect(() => {
    let live = true;
    fetch("/api/tiles/style.json")
      .then((r) => (r.ok ? (r.json() as Promise<StyleSpecification>) : null))
      .catch(() => null)
      .then((s) => live && setBase(s && Array.isArray(s.layers) ? s : null));
    return () => {
      live = false;
    };
  }, []);
  const style = useMemo<StyleSpecification | null>(() => {
    if (!t || base === undefined) return null;
    if (base) return recolour(base, t);
    return { version: 8, sources: {}, layers: [{ id: "background", type: "background", paint: { "background-color": t.color.bg! } }] };
  }, [t, base]);
  const siteData = useMemo<FeatureCollection>(
    () => ({ type: "FeatureCollection", features: sites.map((s) => ({ type: "Feature", properties: { name: s.name }, geometry: s.boundary })) }),
    [sites],
  );
  const placed = spots.map((s, i) => ({ ...s, i })).filter((s) => s.lat !== null && s.lon !== null) as { lat: number; lon: number; i: number }[];
  const start = useMemo(() => initialView(placed, sites), []); // eslint-disable-line react-hooks/exhaustive-deps

  if (!t || !style) {
    return (
      <p role="status" className="flex h-72 items-center justify-center rounded-card border border-line text-muted sm:h-96">
        Loading the map…
      </p>
    );
  }
  return (
    <div className="h-72 w-full overflow-hidden rounded-card border border-line sm:h-96" role="group" aria-label={`Map: tap to place spot ${active + 1}`}>
      <MapGL
        key={t.theme}
        initialViewState={start}
        mapStyle={style}
        cursor="crosshair"
        onClick={(e: MapLayerMouseEvent) => onPick(round(e.lngLat.lat), round(e.lngLat.lng))}
        attributionControl={false}
        style={{ width: "100%", height: "100%" }}
      >
        <NavigationControl position="top-right" showCompass={false} />
        <Source id="survey-sites" type="geojson" data={siteData}>
          <Layer id="survey-site-fill" type="fill" paint={{ "fill-color": t.rgba("accent", 0.15) }} />
          <Layer id="survey-site-line" type="line" paint={{ "line-color": t.color.accent!, "line-width": 2 }} />
        </Source>
        {placed.map((s) => (
          <Marker key={s.i} latitude={s.lat} longitude={s.lon} anchor="center">
            <span
              aria-hidden="true"
              className={`flex h-7 w-7 items-center justify-center rounded-full border-2 text-xs font-bold ${s.i === active ? "border-fg bg-warn text-bg" : "border-bg bg-accent text-bg"}`}
            >
              {s.i + 1}
            </span>
          </Marker>
        ))}
      </MapGL>
    </div>
  );
}

/** Six decimals of a degree is about 0.1 m: more than a handheld position needs. */
const round = (x: number) => Math.round(x * 1e6) / 1e6;

function initialView(placed: { lat: number; lon: number }[], sites: SpotMapSite[]) {
  if (placed.length > 0) return { latitude: placed[0]!.lat, longitude: placed[0]!.lon, zoom: 12 };
  const pts = sites.flatMap((s) => (s.boundary.type === "Polygon" ? s.boundary.coordinates : s.boundary.coordinates.flat()).flat());
  if (pts.length === 0) return { latitude: 20, longitude: 0, zoom: 1 };
  const lons = pts.map((p) => p[0]!);
  const lats = pts.map((p) => p[1]!);
  return { longitude: (Math.min(...lons) + Math.max(...lons)) / 2, latitude: (Math.min(...lats) + Math.max(...lats)) / 2, zoom: 4 };
}
