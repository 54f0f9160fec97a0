"use client";

/**
 * The glow-estimate map: the app's own base map (/api/tiles/style.json, themed with the design tokens
 * as the network map is), the sites' boundaries, the proposed development and the known existing
 * sources. A click places whatever the page is placing. The typed latitude/longitude fields beside it
 * are the keyboard and screen-reader way to do the same. Load with next/dynamic and ssr: false.
 */
import "maplibre-gl/dist/maplibre-gl.css";
import * as maplibregl from "maplibre-gl";
import type { StyleSpecification } from "maplibre-gl";
import type { FeatureCollection, MultiPolygon, Polygon } from "geojson";
import { useEffect, useMemo, useState } from "react";
import MapGL, { Layer, Marker, NavigationControl, Source, type MapLayerMouseEvent } from "react-map-gl/maplibre";
import { useThemeTokens, type ThemeTokens } from "@/components/map/use-theme-tokens";

// Turbopack cannot bundle MapLibre's worker: scripts/copy-maplibre-worker.mjs puts it in public/.
maplibregl.setWorkerUrl("/maplibre-gl-worker.mjs");

export type GlowMapProps = {
  sites: { slug: string; name: string; boundary: Polygon | MultiPolygon }[];
  proposed: { lat: number; lon: number } | null;
  sources: { name: string; lat: number; lon: number }[];
  placing: string;
  onPick: (lat: number, lon: number) => void;
};

function themed(base: StyleSpecification, t: ThemeTokens): StyleSpecification {
  return {
    ...base,
    layers: base.layers.map((l) => {
      const m = (l as { metadata?: { "nm:token"?: string; "nm:prop"?: string; "nm:alpha"?: number } }).metadata;
      if (!m?.["nm:token"] || !m["nm:prop"]) return l;
      const colour = m["nm:alpha"] === undefined ? t.color[m["nm:token"]]! : t.rgba(m["nm:token"], m["nm:alpha"]);
      return { ...l, paint: { ...(l as { paint?: object }).paint, [m["nm:prop"]]: colour } } as typeof l;
    }),
  };
}

const round = (x: number) => Math.round(x * 1e5) / 1e5; // ~1 m

export function GlowMap({ sites, proposed, sources, placing, onPick }: GlowMapProps) {
  const t = useThemeTokens();
  const [base, setBase] = useState<StyleSpecification | null>(null);
  const [failed, setFailed] = useState(false);
  useEffect(() => {
    let live = true;
    fetch("/api/tiles/style.json")
      .then((r) => (r.ok ? r.json() : Promise.reject(new Error(String(r.status)))))
      .then((s: StyleSpecification) => live && setBase(s))
      .catch(() => live && setFailed(true));
    return () => {
      live = false;
    };
  }, []);
  const style = useMemo(() => (base && t ? themed(base, t) : null), [base, t]);
  const siteData = useMemo<FeatureCollection>(
    () => ({ type: "FeatureCollection", features: sites.map((s) => ({ type: "Feature", properties: { name: s.name }, geometry: s.boundary })) }),
    [sites],
  );
  const start = useMemo(() => {
    const pts = sites.flatMap((s) => (s.boundary.type === "Polygon" ? s.boundary.coordinates : s.boundary.coordinates.flat()).flat());
    if (!pts.length) return { latitude: 37, longitude: -110, zoom: 4 };
    const lons = pts.map((p) => p[0]!);
    const lats = pts.map((p) => p[1]!);
    return { longitude: (Math.min(...lons) + Math.max(...lons)) / 2, latitude: (Math.min(...lats) + Math.max(...lats)) / 2, zoom: 4.5 };
  }, [sites]);
  if (failed) return <p className="rounded-card border border-line p-4 text-sm text-muted">The map could not load. Type the positions in the fields instead.</p>;
  if (!style || !t)
    return (
      <div role="status" className="flex h-72 items-center justify-center rounded-card border border-line text-sm text-muted sm:h-[28rem]">
        Loading the map…
      </div>
    );
  return (
    <div className="h-72 w-full overflow-hidden rounded-card border border-line sm:h-[28rem]" role="group" aria-label={`Map: click to place ${placing}`} data-testid="glow-map">
      <MapGL
        key={t.theme}
        initialViewState={start}
        mapStyle={style}
        cursor="crosshair"
        onClick={(e: MapLayerMouseEvent) => onPick(round(e.lngLat.lat), round(e.lngLat.lng))}
        style={{ width: "100%", height: "100%" }}
      >
        <NavigationControl position="top-right" showCompass={false} />
        <Source id="glow-sites" type="geojson" data={siteData}>
          <Layer id="glow-site-fill" type="fill" paint={{ "fill-color": t.rgba("accent", 0.18) }} />
          <Layer id="glow-site-line" type="line" paint={{ "line-color": t.color.accent!, "line-width": 2 }} />
        </Source>
        {sources.map((s, i) => (
          <Marker key={`${s.name}-${i}`} latitude={s.lat} longitude={s.lon} anchor="center">
            <span aria-hidden="true" title={s.name} className="block h-3 w-3 rotate-45 border-2 border-bg bg-muted" />
          </Marker>
        ))}
        {proposed ? (
          <Marker latitude={proposed.lat} longitude={proposed.lon} anchor="center">
            <span aria-hidden="true" className="block h-5 w-5 rounded-full border-2 border-bg bg-warn" />
          </Marker>
        ) : null}
      </MapGL>
    </div>
  );
}
