"use client";

/**
 * Click the map to place a station. Self-contained on purpose: a plain background, the world's
 * land outline (world-atlas, bundled) and the sites' boundaries as GeoJSON, so it works before and
 * without the tile server. Colours are the design tokens read at run time (night mode turns it red).
 * The typed latitude/longitude fields beside it are the keyboard and screen-reader way to do the
 * same; the map is an aid. Load with next/dynamic and ssr: false.
 */
import "maplibre-gl/dist/maplibre-gl.css";
import * as maplibregl from "maplibre-gl";
import type { StyleSpecification } from "maplibre-gl";
import type { FeatureCollection, MultiPolygon, Polygon } from "geojson";
import { useEffect, useMemo, useState } from "react";
import MapGL, { Layer, Marker, NavigationControl, Source, type MapLayerMouseEvent } from "react-map-gl/maplibre";
import { feature } from "topojson-client";
import type { Topology } from "topojson-specification";

// Turbopack cannot bundle MapLibre's worker: scripts/copy-maplibre-worker.mjs puts it in public/.
maplibregl.setWorkerUrl("/maplibre-gl-worker.mjs");

export type PickerSite = { id: string; name: string; boundary: Polygon | MultiPolygon };

export type PositionPickerProps = {
  lat: number | null;
  lon: number | null;
  sites: PickerSite[];
  onPick: (lat: number, lon: number) => void;
};

function token(name: string, alpha = 1): string {
  const v = getComputedStyle(document.documentElement).getPropertyValue(`--nm-${name}`).trim() || "128 128 128";
  return `rgba(${v.split(/\s+/).join(",")},${alpha})`;
}

function useTokens() {
  const [theme, setTheme] = useState(() => document.documentElement.dataset.theme ?? "dark");
  useEffect(() => {
    const obs = new MutationObserver(() => setTheme(document.documentElement.dataset.theme ?? "dark"));
    obs.observe(document.documentElement, { attributes: true, attributeFilter: ["data-theme"] });
    return () => obs.disconnect();
  }, []);
  return useMemo(
    () => ({ theme, bg: token("bg"), land: token("surface"), line: token("line"), site: token("accent", 0.18), siteLine: token("accent"), marker: token("warn") }),
    [theme],
  );
}

export function PositionPicker({ lat, lon, sites, onPick }: PositionPickerProps) {
  const t = useTokens();
  const [land, setLand] = useState<FeatureCollection | null>(null);
  useEffect(() => {
    let live = true;
    void import("world-atlas/land-110m.json").then((m) => {
      const topo = (m.default ?? m) as unknown as Topology;
      const fc = feature(topo, topo.objects.land!) as unknown as FeatureCollection;
      if (live) setLand(fc);
    });
    return () => {
      live = false;
    };
  }, []);
  const siteData = useMemo<FeatureCollection>(
    () => ({ type: "FeatureCollection", features: sites.map((s) => ({ type: "Feature", properties: { name: s.name }, geometry: s.boundary })) }),
    [sites],
  );
  const style = useMemo<StyleSpecification>(
    () => ({ version: 8, sources: {}, layers: [{ id: "background", type: "background", paint: { "background-color": t.bg } }] }),
    [t],
  );
  const start = lat !== null && lon !== null ? { latitude: lat, longitude: lon, zoom: 9 } : initialView(sites);
  return (
    <div className="h-72 w-full overflow-hidden rounded-card border border-line sm:h-96" role="group" aria-label="Map: click to place the station">
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
        {land ? (
          <Source id="land" type="geojson" data={land}>
            <Layer id="land-fill" type="fill" paint={{ "fill-color": t.land }} />
            <Layer id="land-line" type="line" paint={{ "line-color": t.line, "line-width": 1 }} />
          </Source>
        ) : null}
        <Source id="sites" type="geojson" data={siteData}>
          <Layer id="site-fill" type="fill" paint={{ "fill-color": t.site }} />
          <Layer id="site-line" type="line" paint={{ "line-color": t.siteLine, "line-width": 2 }} />
        </Source>
        {lat !== null && lon !== null ? (
          <Marker latitude={lat} longitude={lon} anchor="center">
            <span aria-hidden="true" className="block h-4 w-4 rounded-full border-2 border-bg" style={{ background: t.marker }} />
          </Marker>
        ) : null}
      </MapGL>
    </div>
  );
}

/** Six decimals of a degree is about 0.1 m: more than any meter's position needs. */
const round = (x: number) => Math.round(x * 1e6) / 1e6;

function initialView(sites: PickerSite[]) {
  const pts = sites.flatMap((s) => (s.boundary.type === "Polygon" ? s.boundary.coordinates : s.boundary.coordinates.flat()).flat());
  if (pts.length === 0) return { latitude: 20, longitude: 0, zoom: 1 };
  const lons = pts.map((p) => p[0]!);
  const lats = pts.map((p) => p[1]!);
  return { longitude: (Math.min(...lons) + Math.max(...lons)) / 2, latitude: (Math.min(...lats) + Math.max(...lats)) / 2, zoom: 4 };
}
