/**
 * Public-domain boundary data for the base map, from registry packages (no download at run time):
 * - world-atlas 2 (Natural Earth 1:50m land and countries, public domain);
 * - us-atlas 3 (US Census Bureau cartographic boundaries 1:10m: states and counties, public domain),
 *   the finer detail for the demo region (Utah, Arizona, northern California).
 * Turned into GeoJSON once per process (see lib/tiles/index.ts for the tile cache).
 */
import { existsSync, readFileSync } from "node:fs";
import { join } from "node:path";
import type { Feature, FeatureCollection, Geometry } from "geojson";
import { feature, mesh } from "topojson-client";
import type { GeometryCollection, Topology } from "topojson-specification";

function loadTopology(pkg: "world-atlas" | "us-atlas", file: string): Topology {
  // Read from disk rather than import: the bundler would inline megabytes of JSON into the route.
  // The app always runs from the project folder (scripts/stack.mjs, next dev/start, vitest, tsx).
  const path = join(process.cwd(), "node_modules", pkg, file);
  if (!existsSync(path)) throw new Error(`Boundary data missing: ${pkg}/${file} (run npm ci)`);
  return JSON.parse(readFileSync(path, "utf8")) as Topology;
}

function asCollection(features: Feature[]): FeatureCollection {
  return { type: "FeatureCollection", features };
}

function asFeatures(fc: Feature | FeatureCollection): Feature[] {
  return fc.type === "FeatureCollection" ? fc.features : [fc];
}

export type BoundaryLayers = {
  /** Land polygons. */
  land: FeatureCollection;
  /** Country borders (lines between countries, coastlines excluded). */
  borders: FeatureCollection;
  /** US state and county lines; property `kind` = "state" | "county". */
  admin: FeatureCollection;
};

export function loadBoundaryLayers(): BoundaryLayers {
  const world = loadTopology("world-atlas", "countries-50m.json");
  const worldLand = loadTopology("world-atlas", "land-50m.json");
  const us = loadTopology("us-atlas", "counties-10m.json");

  const landObj = worldLand.objects.land as GeometryCollection;
  const land = asFeatures(feature(worldLand, landObj) as Feature | FeatureCollection).map(
    (f): Feature => ({ type: "Feature", properties: { kind: "land" }, geometry: f.geometry }),
  );

  const countries = world.objects.countries as GeometryCollection;
  const borderGeom = mesh(world, countries, (a, b) => a !== b) as Geometry;
  const borders: Feature[] = [{ type: "Feature", properties: { kind: "country" }, geometry: borderGeom }];

  const states = us.objects.states as GeometryCollection;
  const counties = us.objects.counties as GeometryCollection;
  const stateLines = mesh(us, states, (a, b) => a !== b) as Geometry;
  // County lines that are not also state lines (FIPS: the first two digits are the state).
  const countyLines = mesh(us, counties, (a, b) => a !== b && String(a.id).slice(0, 2) === String(b.id).slice(0, 2)) as Geometry;
  const admin: Feature[] = [
    { type: "Feature", properties: { kind: "state" }, geometry: stateLines },
    { type: "Feature", properties: { kind: "county" }, geometry: countyLines },
  ];

  return { land: asCollection(land), borders: asCollection(borders), admin: asCollection(admin) };
}
