import { NextResponse } from "next/server";
import { route } from "@/lib/http/respond";
import { convertQuery } from "@/lib/convert";

/**
 * GET /api/v1/convert (public):
 *   ?mag=21.5            → every conversion of a zenith reading (lib/photometry.ts convertAll)
 *   ?luminanceCdM2=0.0003 → the magnitude, then the same
 *   ?nelm=6.2            → the magnitude for a naked-eye limiting magnitude, then the same
 *   ?mag=21.5&mag2=20.5  → the difference as a brightness ratio
 */
export const GET = route(async (req) => {
  const body = convertQuery(new URL(req.url).searchParams);
  return NextResponse.json(body, { headers: { "Cache-Control": "public, max-age=86400" } });
});
