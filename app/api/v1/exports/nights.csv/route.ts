import { context } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { csvResponse, nightsCsvStream, resolveExportScope } from "@/lib/briefs/exports";

export const dynamic = "force-dynamic";

/**
 * GET /api/v1/exports/nights.csv?site=|station=&from=&to= → streamed CSV with a `#` header block
 * (lib/briefs/exports.ts). Sites: whoever may see the site (signed out: public sites); stations: signed in.
 */
export const GET = route(async (req) => {
  const url = new URL(req.url);
  const input = Object.fromEntries(["site", "station", "from", "to"].map((k) => [k, url.searchParams.get(k) ?? undefined]));
  const ctx = await context();
  const scope = await resolveExportScope({ ctx, input });
  return csvResponse(nightsCsvStream(scope), `nightmark-nights-${scope.filenameStem}.csv`);
});
