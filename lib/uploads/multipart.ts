import { Readable } from "node:stream";
import type { ReadableStream as NodeWebStream } from "node:stream/web";
import busboy from "busboy";
import { badRequest, payloadTooLarge, unsupportedMediaType } from "@/lib/errors";
import { mediaType } from "@/lib/http/body";
import { MAX_UPLOAD_BYTES, MULTIPART_OVERHEAD_BYTES, parseMappingField, type MappingInput } from "./service";

export type FilePart = {
  filename: string | undefined;
  body: AsyncIterable<Uint8Array>;
  /** Resolves once the whole body is read (a field sent after the file is known only then). */
  mapping: Promise<MappingInput | undefined>;
};

/** Refuses an oversize body from its declared length, before reading any of it. */
export function checkDeclaredLength(req: Request) {
  const declared = Number(req.headers.get("content-length") ?? "NaN");
  if (Number.isFinite(declared) && declared > MAX_UPLOAD_BYTES + MULTIPART_OVERHEAD_BYTES)
    throw payloadTooLarge(`The request is ${declared} bytes; a logger file may be at most ${MAX_UPLOAD_BYTES / (1024 * 1024)} MiB.`);
}

/**
 * Streams a multipart/form-data body: the `file` field is handed to `consume` as it arrives (busboy,
 * never buffered whole), the `mapping` field (JSON) is parsed. Resolves with what `consume` returned.
 */
export async function withMultipartFile<T>(req: Request, consume: (part: FilePart) => Promise<T>): Promise<T> {
  if (mediaType(req) !== "multipart/form-data")
    throw unsupportedMediaType(`Content-Type ${mediaType(req) || "(none)"} is not accepted; send multipart/form-data with the file in a field named "file".`);
  if (!req.body) throw badRequest('The body is empty; send the file in a multipart field named "file".');
  let bb: busboy.Busboy;
  try {
    bb = busboy({
      headers: { "content-type": req.headers.get("content-type") ?? "" },
      // One byte over the limit, so an oversize file is noticed (and refused) rather than cut.
      limits: { files: 1, fields: 10, fieldSize: 16 * 1024, fileSize: MAX_UPLOAD_BYTES + 1 },
    });
  } catch (err) {
    throw badRequest(`The multipart body cannot be read: ${(err as Error).message}.`);
  }
  const input = Readable.fromWeb(req.body as unknown as NodeWebStream<Uint8Array>);
  let mappingRaw: string | undefined;
  let resolveDone!: () => void;
  let rejectDone!: (e: unknown) => void;
  const done = new Promise<void>((res, rej) => {
    resolveDone = res;
    rejectDone = rej;
  });
  done.catch(() => {});
  const mapping = done.then(() => parseMappingField(mappingRaw));
  mapping.catch(() => {});

  const result = new Promise<T>((resolve, reject) => {
    let gotFile = false;
    bb.on("field", (name, value) => {
      if (name === "mapping") mappingRaw = value;
    });
    bb.on("file", (name, stream, info) => {
      if (name !== "file" || gotFile) {
        stream.resume();
        return;
      }
      gotFile = true;
      consume({ filename: info.filename, body: stream, mapping }).then(resolve, (err) => {
        stream.resume();
        input.unpipe(bb);
        input.destroy();
        reject(err);
      });
    });
    bb.on("close", () => {
      resolveDone();
      if (!gotFile) reject(badRequest('No file in the body: send it in a multipart field named "file".'));
    });
    bb.on("error", (err) => {
      const e = badRequest(`The multipart body cannot be read: ${(err as Error).message}.`);
      rejectDone(e);
      reject(e);
    });
    input.on("error", (err) => {
      rejectDone(err);
      reject(err);
    });
  });
  input.pipe(bb);
  return result;
}
