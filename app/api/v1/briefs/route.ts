import { NextResponse } from "next/server";
import { context } from "@/lib/auth/guard";
import { badRequest } from "@/lib/errors";
import { route } from "@/lib/http/respond";
import { createBrief, listMyBriefs } from "@/lib/briefs/service";

export const dynamic = "force-dynamic";

/** GET /api/v1/briefs → my briefs with status and progress (the briefs page polls this). */
export const GET = route(async () => {
  const ctx = await context();
  const briefs = await listMyBriefs({ ctx });
  return NextResponse.json({ briefs }, { headers: { "Cache-Control": "private, no-store" } });
});

/** POST /api/v1/briefs {sites: [slug], from, to, glowEstimateIds?} → 202 {id}; the worker renders it. */
export const POST = route(async (req) => {
  const ctx = await context();
  const body: unknown = await req.json().catch(() => {
    throw badRequest("The body must be JSON: {\"sites\": [\"slug\"], \"from\": \"YYYY-MM-DD\", \"to\": \"YYYY-MM-DD\"}.");
  });
  const { id } = await createBrief({ ctx, input: body as never });
  return NextResponse.json({ id, status: "queued" }, { status: 202 });
});
