import { NextResponse } from "next/server";
import { context } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { getUpload } from "@/lib/uploads/service";

export const dynamic = "force-dynamic";

/**
 * GET /api/v1/uploads/:id — an upload's state and result: status, bytesProcessed of sizeBytes,
 * rowsRead, accepted, duplicates, rejectedCount and the first 1,000 rejections {line, reason}.
 * The station's token or a session that manages the station; anyone else gets 404.
 */
export const GET = route(async (req: Request, { params }: { params: Promise<{ id: string }> }) => {
  const ctx = await context();
  const upload = await getUpload({ ctx, input: { id: (await params).id, authorization: req.headers.get("authorization") } });
  return NextResponse.json(upload, { headers: { "Cache-Control": "no-store" } });
});
