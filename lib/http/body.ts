import { badRequest, payloadTooLarge } from "@/lib/errors";

/**
 * Reads a request body as text, refusing it as soon as it passes maxBytes: from Content-Length
 * before reading anything, otherwise while streaming, so an oversize body is never held whole.
 */
export async function readBodyText(req: Request, maxBytes: number): Promise<string> {
  const declared = Number(req.headers.get("content-length") ?? "NaN");
  if (Number.isFinite(declared) && declared > maxBytes)
    throw payloadTooLarge(`The body is ${declared} bytes; at most ${maxBytes} bytes are accepted in one request.`);
  if (!req.body) return "";
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > maxBytes) {
      await reader.cancel().catch(() => {});
      throw payloadTooLarge(`The body is larger than ${maxBytes} bytes, the most accepted in one request.`);
    }
    chunks.push(value);
  }
  try {
    return new TextDecoder("utf-8", { fatal: true }).decode(Buffer.concat(chunks));
  } catch {
    throw badRequest("The body is not valid UTF-8 text.");
  }
}

export function mediaType(req: Request): string {
  return (req.headers.get("content-type") ?? "").split(";")[0]!.trim().toLowerCase();
}
