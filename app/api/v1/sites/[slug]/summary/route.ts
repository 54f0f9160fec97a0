import { NextResponse } from "next/server";
import { context } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { getSiteSummary } from "@/lib/sites/service";

export const dynamic = "force-dynamic";
type Params = { params: Promise<{ slug: string }> };

/** GET /api/v1/sites/{slug}/summary. Signed-out callers: public sites only, personal data removed. */
export const GET = route<Params>(async (req, { params }) => {
  const { slug } = await params;
  const ctx = await context();
  const publicView = new URL(req.url).searchParams.get("view") === "public";
  const summary = await getSiteSummary({ ctx, input: { slug, publicView } });
  return NextResponse.json(summary, { headers: { "Cache-Control": summary.mode === "public" ? "public, max-age=60" : "private, max-age=30" } });
});
