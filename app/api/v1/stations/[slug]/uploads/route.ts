import { NextResponse } from "next/server";
import { context } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { checkDeclaredLength, withMultipartFile } from "@/lib/uploads/multipart";
import { stationForUpload, storeUpload } from "@/lib/uploads/service";

export const dynamic = "force-dynamic";

/**
 * POST /api/v1/stations/:slug/uploads — a logger file (multipart field `file`, optional field
 * `mapping` as JSON {timeColumn, timeZone, magColumn, tempColumn}), with a station token for that
 * station or a session of someone who manages it. 202 {id, status, …} for a new file, queued for
 * import; 200 {id, status, duplicate: true, …} when this station already has the same file (SHA-256).
 */
export const POST = route(async (req: Request, { params }: { params: Promise<{ slug: string }> }) => {
  checkDeclaredLength(req);
  const ctx = await context();
  const { station, caller } = await stationForUpload({ ctx, input: { slug: (await params).slug, authorization: req.headers.get("authorization") } });
  const { upload, duplicate } = await withMultipartFile(req, (part) =>
    storeUpload({ db: ctx.db, station, caller, filename: part.filename, body: part.body, mapping: part.mapping }),
  );
  if (duplicate)
    return NextResponse.json(
      { ...upload, duplicate: true, message: `This station already has this file (same SHA-256): upload ${upload.id}. It is not imported twice.` },
      { status: 200 },
    );
  return NextResponse.json({ ...upload, duplicate: false }, { status: 202, headers: { Location: `/api/v1/uploads/${upload.id}` } });
});
