import { context } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { findStationForReader } from "@/lib/stations/access";
import { listStationNights, nightsToCsv, queryObject, stationNightsQuerySchema } from "@/lib/stations/readings";

export const dynamic = "force-dynamic";
type Params = { params: Promise<{ slug: string }> };

/**
 * GET /api/v1/stations/{slug}/nights.csv?from=&to= → the nights route's rows as CSV (header row, CRLF,
 * empty cell = no value; columns in lib/stations/readings.ts NIGHTS_CSV_COLUMNS). Errors stay JSON.
 */
export const GET = route<Params>(async (req, { params }) => {
  const { slug } = await params;
  const query = stationNightsQuerySchema.parse(queryObject(req.url, ["from", "to"]));
  const ctx = await context();
  const viewer = await findStationForReader({ ctx, input: { slug, authorization: req.headers.get("authorization") } });
  const body = await listStationNights({ ctx, input: { viewer, query } });
  return new Response(nightsToCsv(body.nights), {
    headers: {
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Disposition": `attachment; filename="${slug}-nights-${body.from}-${body.to}.csv"`,
      "Cache-Control": "private, max-age=30",
    },
  });
});
