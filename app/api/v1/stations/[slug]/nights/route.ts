import { NextResponse } from "next/server";
import { context } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { findStationForReader } from "@/lib/stations/access";
import { listStationNights, queryObject, stationNightsQuerySchema } from "@/lib/stations/readings";

export const dynamic = "force-dynamic";
type Params = { params: Promise<{ slug: string }> };

/**
 * GET /api/v1/stations/{slug}/nights?from=YYYY-MM-DD&to=YYYY-MM-DD → {station:{slug,name,timeZone}, from, to, nights:[…]}.
 * The same rows as CSV: /api/v1/stations/{slug}/nights.csv (same parameters).
 * Session or the station's own token (Authorization: Bearer); see lib/stations/access.ts.
 */
export const GET = route<Params>(async (req, { params }) => {
  const { slug } = await params;
  const query = stationNightsQuerySchema.parse(queryObject(req.url, ["from", "to"]));
  const ctx = await context();
  const viewer = await findStationForReader({ ctx, input: { slug, authorization: req.headers.get("authorization") } });
  const body = await listStationNights({ ctx, input: { viewer, query } });
  return NextResponse.json(body, { headers: { "Cache-Control": "private, max-age=30" } });
});
