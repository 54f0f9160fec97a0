import { z } from "zod";
import { importErrorMessage, importUpload } from "../import-upload";
import { QUEUES } from "../queue";
import type { JobDefinition } from "./types";

const payload = z.object({ uploadId: z.string().uuid() });

/**
 * The queued import of one upload (ingest/import-upload.ts). A transient failure (database or
 * object store unreachable) is thrown back to pg-boss, which retries with backoff; a permanent
 * one (the file cannot be read, the test hook) is already recorded on the upload as "failed" and
 * waits for the Retry button, so it is not retried blindly ten times.
 */
export const importUploadJob: JobDefinition<{ uploadId: string }> = {
  name: QUEUES.importUpload,
  // A large file at minute cadence takes well under a minute; an hour is a generous stall limit.
  queue: { expireInSeconds: 3600 },
  handler: async (data) => {
    const { uploadId } = payload.parse(data);
    try {
      await importUpload(uploadId);
    } catch (err) {
      if (importErrorMessage(err).transient) throw err;
    }
  },
};
