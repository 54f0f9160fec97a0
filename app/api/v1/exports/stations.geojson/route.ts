import { context } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { geoJsonResponse, stationsGeoJson } from "@/lib/briefs/exports";

export const dynamic = "force-dynamic";

/** GET /api/v1/exports/stations.geojson?site= → the stations the caller may see, as GeoJSON (RFC 7946). */
export const GET = route(async (req) => {
  const url = new URL(req.url);
  const ctx = await context();
  const body = await stationsGeoJson({ ctx, input: { site: url.searchParams.get("site") ?? undefined } });
  return geoJsonResponse(body, "nightmark-stations.geojson");
});
