import { z } from "zod";
import { pool } from "@/db";
import { enqueue, QUEUES } from "../queue";
import { importErrorMessage, importUpload } from "../import-upload";
import type { JobDefinition } from "./types";

const payload = z.object({ uploadId: z.string().uuid() });

/** Advisory-lock class for "a live worker is importing this upload" (the key is hashtext(upload id)). */
const IMPORT_LOCK_CLASS = 4242;

/**
 * Runs `fn` while holding a session advisory lock for the upload on a connection of its own. If the
 * worker dies, PostgreSQL drops the connection and with it the lock: that is how a stalled import is
 * told apart from a running one (see resumeOrphanedImports). Returns false when another live worker
 * holds the lock.
 */
async function withImportLock(uploadId: string, fn: () => Promise<void>): Promise<boolean> {
  const client = await pool().connect();
  try {
    const r = await client.query<{ ok: boolean }>(`SELECT pg_try_advisory_lock($1, hashtext($2)) AS ok`, [IMPORT_LOCK_CLASS, uploadId]);
    if (!r.rows[0]?.ok) return false;
    try {
      await fn();
    } finally {
      await client.query(`SELECT pg_advisory_unlock($1, hashtext($2))`, [IMPORT_LOCK_CLASS, uploadId]).catch(() => {});
    }
    return true;
  } finally {
    client.release();
  }
}

/**
 * Uploads left behind by a worker that died (killed, crashed, machine restarted) or by a job the
 * queue lost. Each is queued again; the import restarts from line 1, which stores nothing twice.
 */
export async function resumeOrphanedImports(): Promise<string[]> {
  const client = await pool().connect();
  const resumed: string[] = [];
  try {
    // "importing" with nobody holding its lock: the worker died. "queued" for a while with no job
    // waiting in the queue: the job was lost (e.g. the database went away while it was failing).
    const rows = await client.query<{ id: string }>(
      `SELECT u.id FROM uploads u
        WHERE u.status = 'importing'
           OR (u.status = 'queued' AND u.created_at < now() - interval '30 seconds'
               AND NOT EXISTS (SELECT 1 FROM pgboss.job j
                                WHERE j.name = $1 AND j.data->>'uploadId' = u.id::text AND j.state IN ('created', 'retry')))`,
      [QUEUES.importUpload],
    );
    for (const { id } of rows.rows) {
      const r = await client.query<{ ok: boolean }>(`SELECT pg_try_advisory_lock($1, hashtext($2)) AS ok`, [IMPORT_LOCK_CLASS, id]);
      if (!r.rows[0]?.ok) continue; // a live worker is on it
      await client.query(`SELECT pg_advisory_unlock($1, hashtext($2))`, [IMPORT_LOCK_CLASS, id]);
      await client.query(`UPDATE uploads SET status = 'queued' WHERE id = $1 AND status IN ('importing', 'queued')`, [id]);
      await enqueue(QUEUES.importUpload, { uploadId: id });
      resumed.push(id);
    }
  } finally {
    client.release();
  }
  return resumed;
}

/**
 * The queued import of one upload (ingest/import-upload.ts). A transient failure (database or
 * object store unreachable) is thrown back to pg-boss, which retries with backoff; a permanent
 * one (the file cannot be read, the test hook) is already recorded on the upload as "failed" and
 * waits for the Retry button, so it is not retried blindly ten times.
 */
export const importUploadJob: JobDefinition<{ uploadId: string }> = {
  name: QUEUES.importUpload,
  // A large file at minute cadence takes well under a minute; an hour is a generous stall limit.
  // A worker that dies mid-import is noticed much sooner, by its lost lock (resumeOrphanedImports).
  queue: { expireInSeconds: 3600 },
  handler: async (data) => {
    const { uploadId } = payload.parse(data);
    await withImportLock(uploadId, async () => {
      try {
        await importUpload(uploadId);
      } catch (err) {
        if (importErrorMessage(err).transient) throw err;
      }
    });
  },
};
