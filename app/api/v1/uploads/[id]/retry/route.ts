import { NextResponse } from "next/server";
import { context } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { retryUpload } from "@/lib/uploads/service";

export const dynamic = "force-dynamic";

/**
 * POST /api/v1/uploads/:id/retry — queues a failed import again (from its first line; rows already
 * stored are not stored twice). 202 {id, status: "queued", …}; 409 when it is done or already running.
 */
export const POST = route(async (req: Request, { params }: { params: Promise<{ id: string }> }) => {
  const ctx = await context();
  const upload = await retryUpload({ ctx, input: { id: (await params).id, authorization: req.headers.get("authorization") } });
  return NextResponse.json(upload, { status: 202 });
});
