import { context } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { geoJsonResponse, sitesGeoJson } from "@/lib/briefs/exports";

export const dynamic = "force-dynamic";

/** GET /api/v1/exports/sites.geojson?site= → the sites the caller may see, as GeoJSON (RFC 7946). */
export const GET = route(async (req) => {
  const url = new URL(req.url);
  const ctx = await context();
  const body = await sitesGeoJson({ ctx, input: { site: url.searchParams.get("site") ?? undefined } });
  return geoJsonResponse(body, "nightmark-sites.geojson");
});
