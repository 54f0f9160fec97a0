import { NextResponse } from "next/server";
import { context } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { findStationForReader } from "@/lib/stations/access";
import { listStationReadings, queryObject, stationReadingsQuerySchema } from "@/lib/stations/readings";

export const dynamic = "force-dynamic";
type Params = { params: Promise<{ slug: string }> };

/**
 * GET /api/v1/stations/{slug}/readings?from=&to=&cursor=&limit= → {station, from, to, readings:[…], next}.
 * Keyset-paged by taken_at: pass `next` back as `cursor` until it is null. limit ≤ 5,000.
 * Session or the station's own token (Authorization: Bearer); see lib/stations/access.ts.
 */
export const GET = route<Params>(async (req, { params }) => {
  const { slug } = await params;
  const query = stationReadingsQuerySchema.parse(queryObject(req.url, ["from", "to", "cursor", "limit"]));
  const ctx = await context();
  const viewer = await findStationForReader({ ctx, input: { slug, authorization: req.headers.get("authorization") } });
  const body = await listStationReadings({ ctx, input: { viewer, query } });
  return NextResponse.json(body, { headers: { "Cache-Control": "private, no-store" } });
});
