/**
 * The object store behind uploads: the AWS SDK's S3 client, pointed by env() at the local fake
 * (scripts/s3-fake.mjs, s3rver) in development and tests, or at any S3-compatible store.
 *
 * Decisions:
 * - Path-style addressing (http://host/bucket/key) always: the fake and most self-hosted stores
 *   need it, and AWS still serves it. (A switch would need an S3_FORCE_PATH_STYLE line in lib/env.ts.)
 * - Checksums only when an operation requires them: the SDK's default (CRC32 on every request,
 *   "aws-chunked" streaming bodies) is not understood by every S3-compatible store.
 * - putObject streams: it reads the body in 8 MiB parts and sends each as a part of a multipart
 *   upload (parts of at least 5 MiB, as S3 requires for all but the last), so a 60 MB file is never
 *   held whole. A body that fits in one part goes as one PutObject. @aws-sdk/lib-storage is not
 *   installed; this is the small part of it we need.
 */
import {
  AbortMultipartUploadCommand,
  CompleteMultipartUploadCommand,
  CreateBucketCommand,
  CreateMultipartUploadCommand,
  DeleteObjectCommand,
  GetObjectCommand,
  HeadBucketCommand,
  PutObjectCommand,
  S3Client,
  UploadPartCommand,
} from "@aws-sdk/client-s3";
import type { Readable } from "node:stream";
import { env } from "@/lib/env";

/** Size of each multipart part (S3's minimum is 5 MiB). */
export const PART_BYTES = 8 * 1024 * 1024;

const g = globalThis as unknown as { __nmS3?: S3Client; __nmBucketReady?: Promise<void> };

export function s3(): S3Client {
  if (!g.__nmS3) {
    const e = env();
    g.__nmS3 = new S3Client({
      endpoint: e.S3_ENDPOINT,
      region: e.S3_REGION,
      forcePathStyle: true,
      credentials: { accessKeyId: e.S3_ACCESS_KEY_ID, secretAccessKey: e.S3_SECRET_ACCESS_KEY },
      requestChecksumCalculation: "WHEN_REQUIRED",
      responseChecksumValidation: "WHEN_REQUIRED",
      // A store that accepts the connection but never answers must not hang a request: give up
      // after a few seconds (one retry), and the caller answers 503 (isTransientStorageError).
      requestHandler: { connectionTimeout: 3_000, requestTimeout: 5_000, throwOnRequestTimeout: true },
      maxAttempts: 2,
    });
  }
  return g.__nmS3;
}

export const bucket = () => env().S3_BUCKET;

/** The object store is down or not answering: "try again later", not a fault in the request. */
export function isTransientStorageError(err: unknown): boolean {
  const e = err as { name?: string; code?: string; $metadata?: unknown; cause?: unknown } | null;
  if (!e || typeof e !== "object") return false;
  if (["TimeoutError", "RequestTimeout", "RequestTimeoutException", "NetworkingError", "ServiceUnavailable", "SlowDown"].includes(e.name ?? ""))
    return true;
  if ("$metadata" in e && ["ECONNREFUSED", "ECONNRESET", "ETIMEDOUT", "EPIPE"].includes(e.code ?? "")) return true;
  return e.cause ? isTransientStorageError(e.cause) : false;
}

/** Creates the bucket when it does not exist yet (once per process). */
export function ensureBucket(): Promise<void> {
  g.__nmBucketReady ??= (async () => {
    const client = s3();
    try {
      await client.send(new HeadBucketCommand({ Bucket: bucket() }));
    } catch (headErr) {
      // A store that is down is not a missing bucket: say so at once instead of trying to create it.
      if (isTransientStorageError(headErr)) throw headErr;
      try {
        await client.send(new CreateBucketCommand({ Bucket: bucket() }));
      } catch (err) {
        const name = (err as { name?: string }).name ?? "";
        if (name !== "BucketAlreadyOwnedByYou" && name !== "BucketAlreadyExists") throw err;
      }
    }
  })().catch((err) => {
    g.__nmBucketReady = undefined;
    throw err;
  });
  return g.__nmBucketReady;
}

/**
 * Stores a stream under `key`, never holding more than one part in memory.
 * Returns the number of bytes written. On any failure the partial multipart upload is aborted, so
 * no half object is left behind, and the error is re-thrown.
 */
export async function putObject(
  key: string,
  body: AsyncIterable<Uint8Array | string>,
  opts: { contentType?: string } = {},
): Promise<{ bytes: number }> {
  await ensureBucket();
  const client = s3();
  const Bucket = bucket();
  const parts: { ETag: string; PartNumber: number }[] = [];
  let uploadId: string | undefined;
  let pending: Buffer[] = [];
  let pendingBytes = 0;
  let total = 0;

  const sendPart = async (data: Buffer) => {
    if (!uploadId) {
      const created = await client.send(new CreateMultipartUploadCommand({ Bucket, Key: key, ContentType: opts.contentType }));
      uploadId = created.UploadId;
      if (!uploadId) throw new Error(`the object store did not start a multipart upload for ${key}`);
    }
    const PartNumber = parts.length + 1;
    const res = await client.send(new UploadPartCommand({ Bucket, Key: key, UploadId: uploadId, PartNumber, Body: data, ContentLength: data.length }));
    parts.push({ ETag: res.ETag ?? "", PartNumber });
  };

  try {
    for await (const chunk of body) {
      const buf = typeof chunk === "string" ? Buffer.from(chunk, "utf8") : Buffer.from(chunk.buffer, chunk.byteOffset, chunk.byteLength);
      pending.push(buf);
      pendingBytes += buf.length;
      total += buf.length;
      if (pendingBytes >= PART_BYTES) {
        const all = Buffer.concat(pending, pendingBytes);
        pending = [];
        pendingBytes = 0;
        // Send exactly PART_BYTES and keep the rest for the next part.
        await sendPart(all.subarray(0, PART_BYTES));
        if (all.length > PART_BYTES) {
          pending.push(all.subarray(PART_BYTES));
          pendingBytes = all.length - PART_BYTES;
        }
      }
    }
    const rest = Buffer.concat(pending, pendingBytes);
    if (!uploadId) {
      await client.send(new PutObjectCommand({ Bucket, Key: key, Body: rest, ContentLength: rest.length, ContentType: opts.contentType }));
      return { bytes: total };
    }
    if (rest.length > 0) await sendPart(rest);
    await client.send(new CompleteMultipartUploadCommand({ Bucket, Key: key, UploadId: uploadId, MultipartUpload: { Parts: parts } }));
    return { bytes: total };
  } catch (err) {
    if (uploadId) await client.send(new AbortMultipartUploadCommand({ Bucket, Key: key, UploadId: uploadId })).catch(() => {});
    throw err;
  }
}

/** The object's bytes as a Node stream, read as it arrives. */
export async function getObjectStream(key: string): Promise<{ body: Readable; sizeBytes: number | undefined }> {
  const res = await s3().send(new GetObjectCommand({ Bucket: bucket(), Key: key }));
  if (!res.Body) throw new Error(`the object store returned no body for ${key}`);
  return { body: res.Body as Readable, sizeBytes: res.ContentLength };
}

export async function deleteObject(key: string): Promise<void> {
  await s3().send(new DeleteObjectCommand({ Bucket: bucket(), Key: key }));
}
