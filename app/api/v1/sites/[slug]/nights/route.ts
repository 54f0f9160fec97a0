import { NextResponse } from "next/server";
import { context } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { getSiteNights, nightsQuerySchema } from "@/lib/sites/service";

export const dynamic = "force-dynamic";
type Params = { params: Promise<{ slug: string }> };

/** GET /api/v1/sites/{slug}/nights?from=&to= → nightly site values and the trend. */
export const GET = route<Params>(async (req, { params }) => {
  const { slug } = await params;
  const sp = new URL(req.url).searchParams;
  const q = nightsQuerySchema.parse({ from: sp.get("from") ?? undefined, to: sp.get("to") ?? undefined });
  const ctx = await context();
  const body = await getSiteNights({ ctx, input: { slug, publicView: sp.get("view") === "public", ...q } });
  return NextResponse.json(body, { headers: { "Cache-Control": ctx.user ? "private, max-age=30" : "public, max-age=60" } });
});
