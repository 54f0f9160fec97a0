"use client";

/**
 * The network map: MapLibre over the app's own vector tiles (/api/tiles/style.json), with site
 * boundaries, stations on the darkness ramp and survey points as hollow diamonds. Every colour is a
 * design token read at run time, so the red-only night mode turns the map red too.
 * Load this module with next/dynamic and ssr: false (MapLibre needs the browser).
 */
import "maplibre-gl/dist/maplibre-gl.css";
import * as maplibregl from "maplibre-gl";
import type { ExpressionSpecification, StyleSpecification } from "maplibre-gl";
import { useCallback, useEffect, useMemo, useRef, useState } from "react";
import MapGL, { Layer, NavigationControl, Popup, Source, type MapLayerMouseEvent, type MapRef } from "react-map-gl/maplibre";
import type { MapLayers, SiteProps, StationProps, SurveyPointProps } from "@/lib/map/layers";
import { cn } from "@/lib/cn";
import { rampRadiusPx } from "@/lib/map/ramp";
import { SitePopupBody, StationPopupBody } from "./map-popup";
import { useThemeTokens, type ThemeTokens } from "./use-theme-tokens";

// Turbopack cannot bundle MapLibre's worker: scripts/copy-maplibre-worker.mjs puts it in public/.
maplibregl.setWorkerUrl("/maplibre-gl-worker.mjs");

export type MapSelection = { kind: "station" | "site"; slug: string } | null;

export type NightMapProps = {
  data: Omit<MapLayers, "timings"> | undefined;
  selection: MapSelection;
  onSelect: (s: MapSelection) => void;
  /** Bumped by the parent to fly to the current selection (e.g. from the station list). */
  flyKey?: number;
  /** The view is fitted to the data again whenever this changes (e.g. the site filter). */
  fitKey?: string;
  className?: string;
};

type Hook = { project: (lon: number, lat: number) => { x: number; y: number } | null; loaded: () => boolean };
declare global {
  interface Window {
    __nightmarkMap?: Hook;
  }
}

function themedStyle(base: StyleSpecification, t: ThemeTokens): StyleSpecification {
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

function rampMatch(t: ThemeTokens, fallback: string): ExpressionSpecification {
  return ["match", ["coalesce", ["get", "rampClass"], -1], 0, t.ramp[0]!, 1, t.ramp[1]!, 2, t.ramp[2]!, 3, t.ramp[3]!, 4, t.ramp[4]!, 5, t.ramp[5]!, 6, t.ramp[6]!, fallback];
}

const radiusExpr: ExpressionSpecification = [
  "match",
  ["coalesce", ["get", "rampClass"], -1],
  0, rampRadiusPx(0), 1, rampRadiusPx(1), 2, rampRadiusPx(2), 3, rampRadiusPx(3), 4, rampRadiusPx(4), 5, rampRadiusPx(5), 6, rampRadiusPx(6),
  6,
];

/** Hollow diamonds for survey points, one image per ramp class, drawn in the current token colours. */
function surveyIcon(stroke: string, edge: string): ImageData {
  const size = 22;
  const c = document.createElement("canvas");
  c.width = size;
  c.height = size;
  const g = c.getContext("2d")!;
  const diamond = () => {
    g.beginPath();
    g.moveTo(size / 2, 2);
    g.lineTo(size - 2, size / 2);
    g.lineTo(size / 2, size - 2);
    g.lineTo(2, size / 2);
    g.closePath();
  };
  diamond();
  g.lineWidth = 5;
  g.strokeStyle = edge;
  g.stroke();
  diamond();
  g.lineWidth = 3;
  g.strokeStyle = stroke;
  g.stroke();
  return g.getImageData(0, 0, size, size);
}

function installIcons(map: maplibregl.Map, t: ThemeTokens) {
  t.ramp.forEach((colour, i) => {
    const id = `survey-${i}`;
    const img = surveyIcon(colour, t.color.bg!);
    if (map.hasImage(id)) map.updateImage(id, img);
    else map.addImage(id, img, { pixelRatio: 1 });
  });
}

function boundsOf(data: Omit<MapLayers, "timings">): [[number, number], [number, number]] | null {
  let w = Infinity, s = Infinity, e = -Infinity, n = -Infinity;
  const add = ([x, y]: number[]) => {
    if (x === undefined || y === undefined) return;
    w = Math.min(w, x); e = Math.max(e, x); s = Math.min(s, y); n = Math.max(n, y);
  };
  for (const f of data.stations.features) add(f.geometry.coordinates);
  for (const f of data.surveyPoints.features) add(f.geometry.coordinates);
  for (const f of data.sites.features) {
    const polys = f.geometry.type === "Polygon" ? [f.geometry.coordinates] : f.geometry.coordinates;
    for (const p of polys) for (const r of p) for (const pt of r) add(pt);
  }
  return Number.isFinite(w) ? [[w, s], [e, n]] : null;
}

export function NightMap({ data, selection, onSelect, flyKey = 0, fitKey = "", className }: NightMapProps) {
  const tokens = useThemeTokens();
  const mapRef = useRef<MapRef>(null);
  const [baseStyle, setBaseStyle] = useState<StyleSpecification | null>(null);
  const [loaded, setLoaded] = useState(false);
  // Ready = the map went idle with exactly this data and these colours drawn.
  const [idleWith, setIdleWith] = useState<{ data: unknown; tokens: unknown } | null>(null);
  const ready = !!data && idleWith?.data === data && idleWith?.tokens === tokens;
  const [popupAt, setPopupAt] = useState<[number, number] | null>(null);
  const fitted = useRef<string | null>(null);

  useEffect(() => {
    let live = true;
    fetch("/api/tiles/style.json")
      .then((r) => r.json())
      .then((s: StyleSpecification) => live && setBaseStyle(s))
      .catch(() => {});
    return () => {
      live = false;
    };
  }, []);

  const style = useMemo(() => (baseStyle && tokens ? themedStyle(baseStyle, tokens) : null), [baseStyle, tokens]);

  const station = useMemo(
    () => (selection?.kind === "station" ? data?.stations.features.find((f) => f.properties.slug === selection.slug) : undefined),
    [data, selection],
  );
  const site = useMemo(
    () => (selection?.kind === "site" ? data?.sites.features.find((f) => f.properties.slug === selection.slug) : undefined),
    [data, selection],
  );

  // Fit the view to the data when it first arrives, and again when the fit key (site filter) changes.
  useEffect(() => {
    const map = mapRef.current;
    if (!map || !loaded || !data || fitted.current === fitKey) return;
    const b = boundsOf(data);
    if (b) map.fitBounds(b, { padding: 48, maxZoom: 11, duration: 0 });
    fitted.current = fitKey;
  }, [data, loaded, fitKey]);

  // Fly to a selection chosen outside the map (station list).
  useEffect(() => {
    if (!flyKey || !station) return;
    const [lon, lat] = station.geometry.coordinates as [number, number];
    mapRef.current?.flyTo({ center: [lon, lat], zoom: Math.max(mapRef.current.getZoom(), 9), duration: 600 });
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [flyKey]);

  useEffect(() => {
    const map = mapRef.current?.getMap();
    if (map && loaded && tokens) installIcons(map, tokens);
  }, [loaded, tokens, style]);


  const onLoad = useCallback(() => {
    const map = mapRef.current?.getMap();
    if (!map) return;
    window.__nightmarkMap = {
      project: (lon, lat) => {
        const p = map.project([lon, lat]);
        const r = map.getCanvas().getBoundingClientRect();
        return { x: r.left + p.x, y: r.top + p.y };
      },
      loaded: () => map.loaded(),
    };
    map.on("styleimagemissing", (e: { id: string }) => {
      if (tokens && e.id.startsWith("survey-")) installIcons(map, tokens);
    });
    setLoaded(true);
  }, [tokens]);

  const onIdle = useCallback(() => {
    const map = mapRef.current?.getMap();
    if (data && map?.getSource("stations") && map.getSource("sites")) setIdleWith({ data, tokens });
  }, [data, tokens]);

  const onClick = useCallback(
    (e: MapLayerMouseEvent) => {
      const f = e.features?.[0];
      if (!f) {
        onSelect(null);
        setPopupAt(null);
        return;
      }
      const p = f.properties as StationProps | SiteProps | SurveyPointProps;
      if (p.kind === "station") {
        onSelect({ kind: "station", slug: p.slug });
      } else if (p.kind === "site") {
        setPopupAt([e.lngLat.lng, e.lngLat.lat]);
        onSelect({ kind: "site", slug: p.slug });
      }
    },
    [onSelect],
  );

  if (!style || !tokens) {
    return <div className={className} data-testid="night-map" data-map-ready="false" aria-busy="true" />;
  }

  const t = tokens;
  return (
    <div
      className={cn(
        className,
        // MapLibre's controls in design tokens; in night mode their icons are tinted red like the canvas.
        "[&_.maplibregl-ctrl-attrib]:!bg-surface/90 [&_.maplibregl-ctrl-attrib]:text-muted [&_.maplibregl-ctrl-attrib_a]:!text-muted",
        "[&_.maplibregl-ctrl-group]:!bg-raised [&_.maplibregl-ctrl-group_button]:!h-11 [&_.maplibregl-ctrl-group_button]:!w-11 [&_.maplibregl-ctrl-icon]:invert",
        "[[data-theme=night]_&_.maplibregl-ctrl-icon]:[filter:invert(1)_grayscale(1)_sepia(1)_saturate(6)_hue-rotate(-50deg)_brightness(0.7)]",
        "[&_.maplibregl-popup-tip]:!border-t-surface [&_.maplibregl-popup-close-button]:h-11 [&_.maplibregl-popup-close-button]:w-11 [&_.maplibregl-popup-close-button]:text-fg",
      )}
      data-testid="night-map"
      data-map-ready={ready ? "true" : "false"}
      data-theme-tokens={t.theme}
    >
      <MapGL
        ref={mapRef}
        mapLib={maplibregl}
        mapStyle={style}
        initialViewState={{ longitude: -114, latitude: 37.5, zoom: 4.3 }}
        minZoom={2}
        maxZoom={14}
        style={{ width: "100%", height: "100%" }}
        interactiveLayerIds={["stations-circle", "sites-fill"]}
        onLoad={onLoad}
        onIdle={onIdle}
        onClick={onClick}
        cursor="auto"
        attributionControl={{ compact: true }}
      >
        <NavigationControl position="top-right" showCompass={false} />
        {data ? (
          <>
            <Source id="sites" type="geojson" data={data.sites}>
              <Layer id="sites-fill" type="fill" paint={{ "fill-color": t.color.accent!, "fill-opacity": 0.25 }} />
              {/* Public sites: solid outline; private sites: dashed (a cue that is not colour). */}
              <Layer id="sites-outline" type="line" filter={["==", ["get", "isPublic"], true]} paint={{ "line-color": t.color.accent!, "line-width": 2 }} />
              <Layer
                id="sites-outline-private"
                type="line"
                filter={["!=", ["get", "isPublic"], true]}
                paint={{ "line-color": t.color.accent!, "line-width": 2, "line-dasharray": [3, 2] }}
              />
            </Source>
            <Source id="survey-points" type="geojson" data={data.surveyPoints}>
              <Layer
                id="survey-diamonds"
                type="symbol"
                layout={{ "icon-image": ["concat", "survey-", ["to-string", ["get", "rampClass"]]], "icon-allow-overlap": true }}
              />
            </Source>
            <Source id="stations" type="geojson" data={data.stations}>
              <Layer
                id="stations-circle"
                type="circle"
                paint={{
                  "circle-color": rampMatch(t, "rgba(0, 0, 0, 0)"),
                  "circle-radius": radiusExpr,
                  "circle-stroke-color": ["case", ["==", ["get", "rampClass"], null], t.color.muted!, t.color.fg!],
                  "circle-stroke-width": ["case", ["==", ["get", "rampClass"], null], 2.5, 1.5],
                  "circle-opacity": ["case", ["==", ["get", "status"], "retired"], 0.5, 1],
                }}
              />
              <Layer
                id="stations-selected"
                type="circle"
                filter={["==", ["get", "slug"], station?.properties.slug ?? ""]}
                paint={{ "circle-color": "rgba(0, 0, 0, 0)", "circle-radius": 15, "circle-stroke-color": t.color.accent!, "circle-stroke-width": 3 }}
              />
            </Source>
          </>
        ) : null}
        {station ? (
          <Popup longitude={station.geometry.coordinates[0]!} latitude={station.geometry.coordinates[1]!} onClose={() => { setPopupAt(null); onSelect(null); }} closeOnClick={false} maxWidth="320px" offset={14}>
            <StationPopupBody p={station.properties} periodLabel={data?.period.label ?? ""} />
          </Popup>
        ) : null}
        {site && popupAt ? (
          <Popup longitude={popupAt[0]} latitude={popupAt[1]} onClose={() => { setPopupAt(null); onSelect(null); }} closeOnClick={false} maxWidth="320px">
            <SitePopupBody p={site.properties} periodLabel={data?.period.label ?? ""} />
          </Popup>
        ) : null}
      </MapGL>
    </div>
  );
}
