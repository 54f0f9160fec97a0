import { getDb } from "@/db";
import { route } from "@/lib/http/respond";
import { pdfResponse } from "@/lib/briefs/respond";
import { getSharedBriefPdf } from "@/lib/briefs/service";

export const dynamic = "force-dynamic";
type Params = { params: Promise<{ token: string }> };

/** GET /api/v1/briefs/shared/{token}: no account needed; 404 for an unknown or revoked link. */
export const GET = route<Params>(async (_req, { params }) => {
  const { token } = await params;
  const f = await getSharedBriefPdf({ ctx: { user: null, db: getDb() }, input: { token } });
  return pdfResponse(f, { "X-Robots-Tag": "noindex" });
});
