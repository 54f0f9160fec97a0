/**
 * Imports one stored upload: streams the original file from the object store, parses it line by line
 * (ingest/parse-log.ts), validates every row as the token POST does (validateMag, checkTime,
 * checkTemp), and stores the readings in chunks through storeReadings (screening, idempotent
 * insert on (station, takenAt), night marking).
 *
 * Crash safety — how "nothing half-imported, nothing counted twice" is kept:
 * - Each chunk of ~5,000 rows is ONE transaction: its readings AND the upload's progress counters
 *   (rowsRead, accepted, duplicates, rejectedCount, the first 1,000 rejections, bytesProcessed) commit
 *   together, so the counters never disagree with what is stored, whatever moment a crash hits.
 * - An attempt always starts from the first line: it bumps `attempts` and resets every counter. Rows a
 *   previous, interrupted attempt already stored are conflicts now (ON CONFLICT DO NOTHING), and they
 *   carry this upload's id, so they are counted as ACCEPTED by this upload, not as duplicates: per
 *   chunk, accepted = the chunk's distinct times whose stored row has upload_id = this upload.
 * - At the end the totals are made exact in the same transaction that marks the upload done:
 *   accepted = count of readings with upload_id = this upload (within the file's time range, so the
 *   primary key index is used), duplicates = valid rows − accepted. That also settles a time that
 *   appears twice in the file in different chunks. So accepted + duplicates + rejectedCount = rowsRead,
 *   and a retried import reports exactly what a clean one would.
 * - "done" is written only after the last line was processed; a failed or interrupted import is
 *   "failed" (or "queued" again when the cause was transient and the queue retries it) and is never
 *   shown as a finished file. Its stored rows stay (they are correct readings), and the retry
 *   completes the rest without duplicating them.
 * - Every progress write is guarded by the attempt number, so an attempt that was overtaken (the
 *   queue retried it after a stall while it was still running) stops at its next chunk.
 */
import type { Readable } from "node:stream";
import type { PoolClient } from "pg";
import { pool } from "@/db";
import type { UploadMapping } from "@/db/schema";
import { isTransientDbError } from "@/lib/errors";
import { getObjectStream } from "@/lib/storage/s3";
import { storeReadings, type IngestStation } from "./ingest";
import { LogFormatError, readLogReadings } from "./parse-log";
import { validateMag } from "./screening/screen";
import { checkTemp, checkTime, type ValidReading } from "./validate";

/** Rows per transaction (DOMAIN/STACK: unnest inserts of 5,000 rows are the sweet spot). */
export const CHUNK_ROWS = 5_000;
/** Rejections kept with the upload; all are counted. */
export const MAX_KEPT_REJECTIONS = 1_000;

export type ImportOptions = {
  chunkRows?: number;
  /** Test hook: throw after this many chunks have been committed, as a crash half-way would. */
  failAfterChunks?: number;
  /** The clock for the "in the future" check (tests). */
  now?: number;
};

export type ImportResult = {
  status: "done";
  rowsRead: number;
  accepted: number;
  duplicates: number;
  rejectedCount: number;
};

/** Raised by the failAfterChunks hook. */
export class ImportInterrupted extends Error {
  constructor(chunks: number) {
    super(`The import was interrupted after ${chunks} chunk${chunks === 1 ? "" : "s"} (test hook); retry it.`);
    this.name = "ImportInterrupted";
  }
}

/** Another attempt took this upload over; this one stops quietly. */
class Superseded extends Error {}

/** Station fields the screening needs, with its site's thresholds. */
export async function ingestStation(client: Pick<PoolClient, "query">, stationId: string): Promise<IngestStation> {
  const r = await client.query<{ id: string; lat: number; lon: number; time_zone: string; sun_max_alt_deg: number | null; moon_max_alt_deg: number | null }>(
    `SELECT s.id, s.lat, s.lon, s.time_zone, si.sun_max_alt_deg, si.moon_max_alt_deg
     FROM stations s LEFT JOIN sites si ON si.id = s.site_id WHERE s.id = $1`,
    [stationId],
  );
  const s = r.rows[0];
  if (!s) throw new LogFormatError("the upload's station no longer exists");
  return {
    id: s.id,
    lat: s.lat,
    lon: s.lon,
    timeZone: s.time_zone,
    thresholds: {
      ...(s.sun_max_alt_deg != null ? { sunMaxAltDeg: s.sun_max_alt_deg } : {}),
      ...(s.moon_max_alt_deg != null ? { moonMaxAltDeg: s.moon_max_alt_deg } : {}),
    },
  };
}

async function* counted(body: Readable, onBytes: (n: number) => void): AsyncGenerator<Uint8Array> {
  for await (const chunk of body as AsyncIterable<Buffer>) {
    onBytes(chunk.length);
    yield chunk;
  }
}

async function inTransaction<T>(fn: (c: PoolClient) => Promise<T>): Promise<T> {
  const client = await pool().connect();
  try {
    await client.query("BEGIN");
    const out = await fn(client);
    await client.query("COMMIT");
    return out;
  } catch (err) {
    await client.query("ROLLBACK").catch(() => {});
    throw err;
  } finally {
    client.release();
  }
}

/** Text for uploads.error: what went wrong in words a volunteer can act on (details go to the log). */
export function importErrorMessage(err: unknown): { message: string; transient: boolean } {
  if (err instanceof LogFormatError) return { message: `The file cannot be imported: ${err.message}.`, transient: false };
  if (err instanceof ImportInterrupted) return { message: err.message, transient: false };
  const name = (err as { name?: string; Code?: string } | null)?.name ?? "";
  if (name === "NoSuchKey" || name === "NotFound")
    return { message: "The stored file is missing from the object store; upload it again.", transient: false };
  const code = (err as { code?: string } | null)?.code ?? "";
  if (isTransientDbError(err) || ["ECONNREFUSED", "ECONNRESET", "ETIMEDOUT", "EPIPE", "ENOTFOUND"].includes(code) || name === "TimeoutError")
    return { message: "The import stopped because the database or the object store was unreachable; it is retried automatically.", transient: true };
  return { message: "The import stopped unexpectedly (the details are in the worker's log). Retry it; nothing is imported twice.", transient: false };
}

/**
 * Runs one import attempt from the first line. Returns the totals when the upload is done (also
 * when it already was). Throws after recording the failure on the upload (status "failed", or
 * "queued" for a transient cause that the queue will retry).
 */
export async function importUpload(uploadId: string, opts: ImportOptions = {}): Promise<ImportResult> {
  const chunkRows = opts.chunkRows ?? CHUNK_ROWS;
  const now = opts.now ?? Date.now();
  const db = pool();

  const claimed = await db.query<{ attempts: number; station_id: string; object_key: string; mapping: UploadMapping | null; size_bytes: string }>(
    `UPDATE uploads SET status = 'importing', attempts = attempts + 1, rows_read = 0, accepted = 0, duplicates = 0,
       rejected_count = 0, rejections = '[]'::jsonb, bytes_processed = 0, error = NULL, started_at = now(), finished_at = NULL
     WHERE id = $1 AND status <> 'done'
     RETURNING attempts, station_id, object_key, mapping, size_bytes`,
    [uploadId],
  );
  const up = claimed.rows[0];
  if (!up) {
    const r = await db.query<{ status: string; rows_read: number; accepted: number; duplicates: number; rejected_count: number }>(
      `SELECT status, rows_read, accepted, duplicates, rejected_count FROM uploads WHERE id = $1`,
      [uploadId],
    );
    const row = r.rows[0];
    if (!row) throw new LogFormatError(`upload ${uploadId} does not exist`);
    return { status: "done", rowsRead: row.rows_read, accepted: row.accepted, duplicates: row.duplicates, rejectedCount: row.rejected_count };
  }
  const attempt = up.attempts;
  const sizeBytes = Number(up.size_bytes);

  const recordFailure = async (err: unknown) => {
    const { message, transient } = importErrorMessage(err);
    if (!(err instanceof LogFormatError) && !(err instanceof ImportInterrupted))
      console.error(`[import] upload ${uploadId} attempt ${attempt} failed:`, err);
    await db
      .query(`UPDATE uploads SET status = $3, error = $4, finished_at = now() WHERE id = $1 AND attempts = $2 AND status = 'importing'`, [
        uploadId, attempt, transient ? "queued" : "failed", message,
      ])
      .catch(() => {});
  };

  try {
    if (!up.mapping) throw new LogFormatError("the upload has no column mapping");
    const mapping = up.mapping;
    const station = await ingestStation(db, up.station_id);
    const { body } = await getObjectStream(up.object_key);
    let bytesRead = 0;

    let rowsRead = 0;
    let validRows = 0;
    let rejectedCount = 0;
    let kept = 0;
    let chunks = 0;
    let minT = Number.POSITIVE_INFINITY;
    let maxT = Number.NEGATIVE_INFINITY;
    let batch: ValidReading[] = [];
    let batchRejections: { line: number; reason: string }[] = [];
    let batchRows = 0;
    let batchRejected = 0;

    const flush = async () => {
      if (batchRows === 0) return;
      const items = batch;
      const rejections = batchRejections;
      const rows = batchRows;
      const rejected = batchRejected;
      batch = [];
      batchRejections = [];
      batchRows = 0;
      batchRejected = 0;
      await inTransaction(async (client) => {
        let mine = 0;
        if (items.length > 0) {
          const stored = await storeReadings(station, items, { source: "upload", uploadId, client });
          mine = stored.accepted;
          if (stored.duplicates > 0) {
            // Some times were already stored: count the chunk's distinct times stored by THIS upload
            // (an earlier attempt, or a repeat inside the chunk). The range bounds let PostgreSQL
            // skip the partitions outside the chunk (an ANY alone visits every partition).
            let lo = Number.POSITIVE_INFINITY;
            let hi = Number.NEGATIVE_INFINITY;
            for (const i of items) {
              const ms = i.takenAt.getTime();
              if (ms < lo) lo = ms;
              if (ms > hi) hi = ms;
            }
            const r = await client.query<{ n: number }>(
              `SELECT count(*)::int AS n FROM readings
               WHERE station_id = $1 AND taken_at >= $2 AND taken_at <= $3 AND taken_at = ANY($4::timestamptz[]) AND upload_id = $5`,
              [station.id, new Date(lo), new Date(hi), items.map((i) => i.takenAt), uploadId],
            );
            mine = r.rows[0]!.n;
          }
        }
        const u = await client.query(
          `UPDATE uploads SET rows_read = rows_read + $3, accepted = accepted + $4, duplicates = duplicates + $5,
             rejected_count = rejected_count + $6, rejections = rejections || $7::jsonb, bytes_processed = $8
           WHERE id = $1 AND attempts = $2 AND status = 'importing'`,
          [uploadId, attempt, rows, mine, items.length - mine, rejected, JSON.stringify(rejections), Math.min(bytesRead, sizeBytes)],
        );
        if (u.rowCount === 0) throw new Superseded();
      });
      chunks++;
      if (opts.failAfterChunks !== undefined && chunks >= opts.failAfterChunks) throw new ImportInterrupted(chunks);
    };

    const reject = (line: number, reason: string) => {
      rejectedCount++;
      batchRejected++;
      if (kept < MAX_KEPT_REJECTIONS) {
        batchRejections.push({ line, reason });
        kept++;
      }
    };

    for await (const r of readLogReadings(counted(body, (n) => (bytesRead += n)), mapping)) {
      rowsRead++;
      batchRows++;
      if ("reason" in r) reject(r.line, r.reason);
      else {
        const t = checkTime(r.takenAt, now);
        const magErr = validateMag(r.mag);
        const temp = checkTemp(r.tempC);
        if (typeof t === "string") reject(r.line, t);
        else if (magErr) reject(r.line, magErr);
        else if (typeof temp === "string") reject(r.line, temp);
        else {
          validRows++;
          const ms = t.getTime();
          if (ms < minT) minT = ms;
          if (ms > maxT) maxT = ms;
          batch.push({ index: r.line, takenAt: t, mag: r.mag, tempC: temp });
        }
      }
      if (batchRows >= chunkRows) await flush();
    }
    await flush();

    // Exact totals, in the transaction that marks the upload done (see the header).
    return await inTransaction(async (client) => {
      let accepted = 0;
      if (validRows > 0) {
        const r = await client.query<{ n: number }>(
          `SELECT count(*)::int AS n FROM readings WHERE station_id = $1 AND taken_at >= $2 AND taken_at <= $3 AND upload_id = $4`,
          [station.id, new Date(minT), new Date(maxT), uploadId],
        );
        accepted = r.rows[0]!.n;
      }
      const duplicates = validRows - accepted;
      const u = await client.query(
        `UPDATE uploads SET status = 'done', rows_read = $3, accepted = $4, duplicates = $5, rejected_count = $6,
           bytes_processed = size_bytes, error = NULL, finished_at = now()
         WHERE id = $1 AND attempts = $2 AND status = 'importing'`,
        [uploadId, attempt, rowsRead, accepted, duplicates, rejectedCount],
      );
      if (u.rowCount === 0) throw new Superseded();
      return { status: "done" as const, rowsRead, accepted, duplicates, rejectedCount };
    });
  } catch (err) {
    if (err instanceof Superseded) throw new Error(`upload ${uploadId}: attempt ${attempt} was overtaken by a newer attempt`);
    await recordFailure(err);
    throw err;
  }
}
