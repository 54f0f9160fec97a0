import { NextResponse } from "next/server";
import { context } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { createShare } from "@/lib/briefs/service";

export const dynamic = "force-dynamic";
type Params = { params: Promise<{ id: string }> };

/** POST /api/v1/briefs/{id}/shares → 201 {id, token, url}: the link is shown this once. */
export const POST = route<Params>(async (req, { params }) => {
  const { id } = await params;
  const ctx = await context();
  const share = await createShare({ ctx, input: { id } });
  return NextResponse.json({ id: share.id, token: share.token, url: new URL(share.path, req.url).toString() }, { status: 201, headers: { "Cache-Control": "no-store" } });
});
