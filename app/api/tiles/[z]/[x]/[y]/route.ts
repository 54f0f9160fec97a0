import { NextResponse } from "next/server";
import { badRequest } from "@/lib/errors";
import { route } from "@/lib/http/respond";
import { getTile, isValidTile } from "@/lib/tiles";

export const runtime = "nodejs";

type Params = { params: Promise<{ z: string; x: string; y: string }> };

/** GET /api/tiles/{z}/{x}/{y}: a Mapbox Vector Tile (layers land, borders, admin). Public, cacheable. */
export const GET = route<Params>(async (_req, { params }) => {
  const p = await params;
  const z = Number(p.z);
  const x = Number(p.x);
  const y = Number(String(p.y).replace(/\.(pbf|mvt)$/, ""));
  if (!isValidTile(z, x, y)) throw badRequest(`No tile ${p.z}/${p.x}/${p.y}: z must be 0–14 and x, y within 0…2^z − 1.`);
  const body = getTile(z, x, y);
  // An empty tile is a valid zero-length protobuf; 200 keeps every client happy.
  return new NextResponse(Buffer.from(body), {
    status: 200,
    headers: {
      "Content-Type": "application/x-protobuf",
      // Boundaries change only with a package upgrade: a day in browsers, a week in shared caches.
      "Cache-Control": "public, max-age=86400, s-maxage=604800, stale-while-revalidate=86400",
    },
  });
});
