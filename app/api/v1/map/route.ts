import { NextResponse } from "next/server";
import { context } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { getMapLayers, mapQuerySchema } from "@/lib/map/layers";

export const dynamic = "force-dynamic";

/** GET /api/v1/map?site=&period=&status= → { sites, stations, surveyPoints } GeoJSON. Signed in only. */
export const GET = route(async (req) => {
  const ctx = await context();
  const sp = new URL(req.url).searchParams;
  const input = mapQuerySchema.parse({
    site: sp.get("site") ?? undefined,
    period: sp.get("period") || undefined,
    status: sp.get("status") || undefined,
  });
  const { timings, ...layers } = await getMapLayers({ ctx, input });
  return NextResponse.json(layers, {
    headers: {
      "Cache-Control": "private, max-age=30",
      "Server-Timing": `sites;dur=${timings.sitesMs}, stations;dur=${timings.stationsMs}, surveys;dur=${timings.surveyPointsMs}`,
    },
  });
});
