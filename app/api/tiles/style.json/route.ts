import { NextResponse } from "next/server";
import { route } from "@/lib/http/respond";
import { baseStyle } from "@/lib/tiles/style";

export const runtime = "nodejs";

/** GET /api/tiles/style.json: the base map style, tile URL absolute on the request's own origin. */
export const GET = route(async (req) => {
  const origin = requestOrigin(req);
  return NextResponse.json(baseStyle(origin), { headers: { "Cache-Control": "public, max-age=300" } });
});

function requestOrigin(req: Request): string {
  const url = new URL(req.url);
  const host = req.headers.get("x-forwarded-host") ?? req.headers.get("host") ?? url.host;
  const proto = req.headers.get("x-forwarded-proto") ?? url.protocol.replace(":", "");
  return `${proto}://${host}`;
}
