import type { BriefFile } from "./service";

/** A brief's PDF as a download, with its checksum and verification code in headers. */
export function pdfResponse(f: BriefFile, extra: Record<string, string> = {}): Response {
  return new Response(new Uint8Array(f.bytes), {
    headers: {
      "Content-Type": "application/pdf",
      "Content-Disposition": `attachment; filename="${f.filename}"`,
      "Content-Length": String(f.bytes.length),
      "Cache-Control": "private, no-store",
      "X-Content-SHA256": f.sha256,
      "X-Verification-Code": f.code,
      ...extra,
    },
  });
}
