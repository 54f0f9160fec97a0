import { context } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { pdfResponse } from "@/lib/briefs/respond";
import { getBriefPdf } from "@/lib/briefs/service";

export const dynamic = "force-dynamic";
type Params = { params: Promise<{ id: string }> };

/** GET /api/v1/briefs/{id}/pdf: the brief's maker or an admin; 404 for everyone else. */
export const GET = route<Params>(async (_req, { params }) => {
  const { id } = await params;
  const ctx = await context();
  return pdfResponse(await getBriefPdf({ ctx, input: { id } }));
});
