import { NextResponse } from "next/server";
import { z } from "zod";
import { context } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { getSiteHours, monthSchema } from "@/lib/sites/service";

export const dynamic = "force-dynamic";
type Params = { params: Promise<{ slug: string }> };

/** GET /api/v1/sites/{slug}/hours?month=YYYY-MM → hourly medians of usable readings for one month. */
export const GET = route<Params>(async (req, { params }) => {
  const { slug } = await params;
  const sp = new URL(req.url).searchParams;
  const { month } = z.object({ month: monthSchema }).parse({ month: sp.get("month") ?? "" });
  const ctx = await context();
  const body = await getSiteHours({ ctx, input: { slug, publicView: sp.get("view") === "public", month } });
  return NextResponse.json(body, { headers: { "Cache-Control": ctx.user ? "private, max-age=60" : "public, max-age=300" } });
});
