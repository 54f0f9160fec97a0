import { NextResponse } from "next/server";
import { context } from "@/lib/auth/guard";
import { unprocessable } from "@/lib/errors";
import { route } from "@/lib/http/respond";
import { stationForUpload } from "@/lib/uploads/service";
import { LogFormatError, SNIFF_BYTES, sniff } from "@/ingest/parse-log";

export const dynamic = "force-dynamic";

/**
 * POST /api/v1/stations/:slug/uploads/preview — the first 64 KB of a logger file as the body →
 * what the upload would see: delimiter, metadata, columns, the first 20 rows and a guessed mapping
 * (local times default to the station's zone). The page does the same in the browser with the same
 * code (ingest/parse-log.ts); this is for scripts. Header `X-Complete-File: true` says the body is
 * the whole file (otherwise its last line may be cut and is ignored). Longer bodies are cut at 64 KB.
 */
export const POST = route(async (req: Request, { params }: { params: Promise<{ slug: string }> }) => {
  const ctx = await context();
  const { station } = await stationForUpload({ ctx, input: { slug: (await params).slug, authorization: req.headers.get("authorization") } });
  const chunks: Uint8Array[] = [];
  let total = 0;
  let cut = false;
  if (req.body) {
    const reader = req.body.getReader();
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      chunks.push(value);
      total += value.byteLength;
      if (total >= SNIFF_BYTES) {
        cut = true;
        await reader.cancel().catch(() => {});
        break;
      }
    }
  }
  const bytes = Buffer.concat(chunks).subarray(0, SNIFF_BYTES);
  const complete = !cut && req.headers.get("x-complete-file") === "true";
  try {
    return NextResponse.json(sniff(bytes, { stationTimeZone: station.timeZone, complete }));
  } catch (err) {
    if (err instanceof LogFormatError) throw unprocessable(`The file cannot be read as a delimited log: ${err.message}.`);
    throw err;
  }
});
