/**
 * Logger-file uploads: who may upload for a station, storing the original file (object store,
 * SHA-256, size), the column mapping, queueing the import, reading the result, retrying.
 *
 * Decisions:
 * - Credentials: a station token for that station, or a signed-in person who may manage the station
 *   (owner, a steward of its site, an admin). Anyone else is told the station or upload does not
 *   exist (404), so ids and slugs reveal nothing.
 * - The same file (same SHA-256) for the same station is not imported twice: the reply is 200 with
 *   the EXISTING upload ({id, status, duplicate: true}) instead of 202 for a new one. A logger that
 *   re-sends a file after a lost reply therefore gets a success pointing at the first upload. The
 *   unique index (station_id, sha256) makes this hold under concurrent uploads too.
 * - The file is streamed to the object store while it is hashed; only the first 64 KB are kept in
 *   memory, to check that it is a readable log and to guess the mapping. A file that cannot be read
 *   as a log, or whose mapping names a column it does not have, is refused (422) and its object
 *   deleted, so nothing unusable is left queued.
 * - Limit: 60 MiB (MAX_UPLOAD_BYTES), refused with 413 from Content-Length before reading, and while
 *   streaming when the length was not declared or was wrong.
 */
import { createHash, randomUUID } from "node:crypto";
import { and, desc, eq, inArray, or, sql } from "drizzle-orm";
import { z } from "zod";
import type { Db } from "@/db";
import { siteStewards, sites, stations, uploads, type UploadMapping } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import { requireUser, type Ctx } from "@/lib/auth/guard";
import { badRequest, conflict, notFound, payloadTooLarge, unprocessable } from "@/lib/errors";
import { authenticateToken, canManageStation } from "@/lib/stations/tokens";
import { deleteObject, putObject } from "@/lib/storage/s3";
import { LogFormatError, rowInterpreter, sniff, SNIFF_BYTES, type Delimiter } from "@/ingest/parse-log";
import { boss, enqueue, QUEUES } from "@/ingest/queue";

export const MAX_UPLOAD_BYTES = 60 * 1024 * 1024;
/** Room for the multipart boundaries and the small fields around the file. */
export const MULTIPART_OVERHEAD_BYTES = 64 * 1024;

export const mappingInputSchema = z.object({
  delimiter: z.enum([",", ";", "\t"]).optional(),
  timeColumn: z.string().trim().min(1).max(200).optional(),
  timeZone: z.string().trim().min(1).max(100).optional(),
  magColumn: z.string().trim().min(1).max(200).optional(),
  tempColumn: z.string().trim().max(200).nullable().optional(),
});
export type MappingInput = z.infer<typeof mappingInputSchema>;

/** Parses the multipart `mapping` field (JSON). */
export function parseMappingField(raw: string | undefined): MappingInput | undefined {
  if (raw === undefined || raw.trim() === "") return undefined;
  let json: unknown;
  try {
    json = JSON.parse(raw);
  } catch {
    throw badRequest('The "mapping" field is not valid JSON: send {"timeColumn","timeZone","magColumn","tempColumn"}.');
  }
  const r = mappingInputSchema.safeParse(json);
  if (!r.success) {
    const i = r.error.issues[0]!;
    throw badRequest(`mapping.${i.path.join(".") || "(root)"}: ${i.message}`);
  }
  return r.data;
}

export type UploadStation = {
  id: string;
  slug: string;
  name: string;
  timeZone: string;
  ownerId: string;
  siteId: string | null;
};

const stationCols = {
  id: stations.id,
  slug: stations.slug,
  name: stations.name,
  timeZone: stations.timeZone,
  ownerId: stations.ownerId,
  siteId: stations.siteId,
  status: stations.status,
};

export type Caller = { actorId: string | null; via: "token" | "session" };

/**
 * The station an upload goes to, for a station token (of that station) or a session of someone who
 * may manage it. 401 without credentials; 404 for anyone else.
 */
export async function stationForUpload({ ctx, input }: { ctx: Ctx; input: { slug: string; authorization: string | null } }): Promise<{ station: UploadStation; caller: Caller }> {
  if (input.authorization && /^Bearer\s/i.test(input.authorization)) {
    const p = await authenticateToken(ctx.db, input.authorization);
    if (p.station.slug !== input.slug) throw notFound("Station");
    const [st] = await ctx.db.select(stationCols).from(stations).where(eq(stations.id, p.station.id)).limit(1);
    return { station: st!, caller: { actorId: null, via: "token" } };
  }
  const user = requireUser(ctx);
  const [st] = await ctx.db.select(stationCols).from(stations).where(eq(stations.slug, input.slug)).limit(1);
  if (!st || !(await canManageStation(ctx, st))) throw notFound("Station");
  if (st.status === "retired") throw unprocessable("This station is retired and no longer takes readings.");
  return { station: st, caller: { actorId: user.id, via: "session" } };
}

export type UploadView = {
  id: string;
  station: { slug: string; name: string; timeZone: string };
  filename: string;
  sizeBytes: number;
  sha256: string;
  status: "stored" | "queued" | "importing" | "done" | "failed";
  mapping: UploadMapping | null;
  metadata: Record<string, string>;
  rowsRead: number;
  accepted: number;
  duplicates: number;
  rejectedCount: number;
  rejections: { line: number; reason: string }[];
  bytesProcessed: number;
  error: string | null;
  attempts: number;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
};

const viewCols = {
  id: uploads.id,
  stationId: uploads.stationId,
  uploadedBy: uploads.uploadedBy,
  filename: uploads.filename,
  sizeBytes: uploads.sizeBytes,
  sha256: uploads.sha256,
  status: uploads.status,
  mapping: uploads.mapping,
  metadata: uploads.metadata,
  rowsRead: uploads.rowsRead,
  accepted: uploads.accepted,
  duplicates: uploads.duplicates,
  rejectedCount: uploads.rejectedCount,
  rejections: uploads.rejections,
  bytesProcessed: uploads.bytesProcessed,
  error: uploads.error,
  attempts: uploads.attempts,
  createdAt: uploads.createdAt,
  startedAt: uploads.startedAt,
  finishedAt: uploads.finishedAt,
  stationSlug: stations.slug,
  stationName: stations.name,
  stationTimeZone: stations.timeZone,
  ownerId: stations.ownerId,
  siteId: stations.siteId,
};


function toView(r: ViewRow): UploadView {
  return {
    id: r.id,
    station: { slug: r.stationSlug, name: r.stationName, timeZone: r.stationTimeZone },
    filename: r.filename,
    sizeBytes: r.sizeBytes,
    sha256: r.sha256,
    status: r.status,
    mapping: r.mapping ?? null,
    metadata: r.metadata,
    rowsRead: r.rowsRead,
    accepted: r.accepted,
    duplicates: r.duplicates,
    rejectedCount: r.rejectedCount,
    rejections: r.rejections,
    bytesProcessed: r.bytesProcessed,
    error: r.error,
    attempts: r.attempts,
    createdAt: r.createdAt.toISOString(),
    startedAt: r.startedAt?.toISOString() ?? null,
    finishedAt: r.finishedAt?.toISOString() ?? null,
  };
}

function selectViews(db: Db) {
  return db.select(viewCols).from(uploads).innerJoin(stations, eq(stations.id, uploads.stationId));
}
type ViewRow = Awaited<ReturnType<typeof selectViews>>[number];

async function loadView(db: Db, id: string): Promise<ViewRow | undefined> {
  const [row] = await selectViews(db).where(eq(uploads.id, id)).limit(1);
  return row;
}

const UUID_RE = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** An upload the caller may see: its station's token, or a session that may manage the station (or uploaded it). */
async function uploadForCaller(ctx: Ctx, id: string, authorization: string | null): Promise<ViewRow> {
  if (!UUID_RE.test(id)) throw notFound("Upload");
  if (authorization && /^Bearer\s/i.test(authorization)) {
    const p = await authenticateToken(ctx.db, authorization);
    const row = await loadView(ctx.db, id);
    if (!row || row.stationId !== p.station.id) throw notFound("Upload");
    return row;
  }
  const user = requireUser(ctx);
  const row = await loadView(ctx.db, id);
  if (!row) throw notFound("Upload");
  if (row.uploadedBy !== user.id && !(await canManageStation(ctx, row))) throw notFound("Upload");
  return row;
}

export async function getUpload({ ctx, input }: { ctx: Ctx; input: { id: string; authorization: string | null } }): Promise<UploadView> {
  return toView(await uploadForCaller(ctx, input.id, input.authorization));
}

const IMPORT_JOB_OPTIONS = { expireInSeconds: 3600 };

async function queueImport(uploadId: string) {
  try {
    await enqueue(QUEUES.importUpload, { uploadId }, IMPORT_JOB_OPTIONS);
  } catch {
    // pg-boss 10 refuses to send to a queue that does not exist yet (the worker creates it when it
    // starts): create it here and send once more.
    const b = await boss();
    await b.createQueue(QUEUES.importUpload, { name: QUEUES.importUpload, retryLimit: 10, retryDelay: 5, retryBackoff: true }).catch(() => {});
    await enqueue(QUEUES.importUpload, { uploadId }, IMPORT_JOB_OPTIONS);
  }
}

/**
 * Marks a failed (or never queued) upload as queued again and queues its import. The import starts
 * from the first line; rows already stored are recognised (see ingest/import-upload.ts).
 */
export async function retryUpload({ ctx, input }: { ctx: Ctx; input: { id: string; authorization: string | null } }): Promise<UploadView> {
  const row = await uploadForCaller(ctx, input.id, input.authorization);
  const [moved] = await ctx.db
    .update(uploads)
    .set({ status: "queued", error: null })
    .where(and(eq(uploads.id, row.id), inArray(uploads.status, ["failed", "stored"])))
    .returning({ id: uploads.id });
  if (!moved) {
    if (row.status === "done") throw conflict("This upload was imported completely; there is nothing to retry.", { id: row.id, status: row.status });
    throw conflict("This upload's import is already queued or running.", { id: row.id, status: row.status });
  }
  await recordAudit(ctx.db, { actorId: ctx.user?.id ?? null, action: "upload.retry", entityType: "upload", entityId: row.id, before: { status: row.status } });
  await queueImport(row.id);
  return toView((await loadView(ctx.db, row.id))!);
}

function cleanFilename(name: string | undefined): string {
  const base = (name ?? "").split(/[\\/]/).pop()!.replace(/[\u0000-\u001f\u007f]/g, "").trim();
  return (base || "logger-file.txt").slice(0, 255);
}

/**
 * Streams a file to the object store and records the upload. Returns the new upload (queued unless
 * `queue: false`), or the existing one when this station already has a file with the same SHA-256.
 */
export async function storeUpload(input: {
  db: Db;
  station: UploadStation;
  caller: Caller;
  filename: string | undefined;
  body: AsyncIterable<Uint8Array> | Iterable<Uint8Array>;
  /** The mapping may arrive after the file in a multipart body: resolved once the body is read. */
  mapping?: Promise<MappingInput | undefined> | MappingInput;
  maxBytes?: number;
  queue?: boolean;
}): Promise<{ upload: UploadView; duplicate: boolean }> {
  const { db, station, caller } = input;
  const maxBytes = input.maxBytes ?? MAX_UPLOAD_BYTES;
  const id = randomUUID();
  const objectKey = `uploads/${station.id}/${id}`;
  const hash = createHash("sha256");
  const head: Buffer[] = [];
  let headBytes = 0;
  let size = 0;

  async function* measured(): AsyncGenerator<Uint8Array> {
    for await (const chunk of input.body) {
      size += chunk.byteLength;
      if (size > maxBytes) throw payloadTooLarge(`The file is larger than ${maxBytes / (1024 * 1024)} MiB, the most accepted in one upload; split it.`);
      hash.update(chunk);
      if (headBytes < SNIFF_BYTES) {
        const part = Buffer.from(chunk.buffer, chunk.byteOffset, Math.min(chunk.byteLength, SNIFF_BYTES - headBytes));
        head.push(Buffer.from(part));
        headBytes += part.length;
      }
      yield chunk;
    }
  }

  await putObject(objectKey, measured(), { contentType: "text/plain; charset=utf-8" });
  let inserted = false;
  try {
    const sha256 = hash.digest("hex");
    const existing = await findBySha(db, station.id, sha256);
    if (existing) return { upload: existing, duplicate: true };
    if (size === 0) throw unprocessable("The file is empty.");

    let preview;
    try {
      preview = sniff(Buffer.concat(head), { stationTimeZone: station.timeZone, complete: size <= SNIFF_BYTES });
    } catch (err) {
      if (err instanceof LogFormatError) throw unprocessable(`The file cannot be read as a delimited log: ${err.message}.`);
      throw err;
    }
    const given = (await input.mapping) ?? {};
    const g = preview.guessedMapping;
    const timeColumn = given.timeColumn ?? g.timeColumn;
    const magColumn = given.magColumn ?? g.magColumn;
    const cols = preview.columns.join(", ");
    if (!timeColumn) throw unprocessable(`No time column was recognised; say which one in the mapping (the file's columns: ${cols}).`);
    if (!magColumn) throw unprocessable(`No brightness column was recognised; say which one in the mapping (the file's columns: ${cols}).`);
    const mapping: UploadMapping = {
      delimiter: (given.delimiter ?? preview.delimiter) as Delimiter,
      timeColumn,
      timeZone: given.timeZone ?? g.timeZone,
      magColumn,
      tempColumn: given.tempColumn === undefined ? g.tempColumn : given.tempColumn || null,
    };
    try {
      rowInterpreter(preview.columns, mapping);
    } catch (err) {
      if (err instanceof LogFormatError) throw unprocessable(`The mapping does not fit the file: ${err.message}.`);
      throw err;
    }

    const [row] = await db
      .insert(uploads)
      .values({
        id,
        stationId: station.id,
        uploadedBy: caller.actorId,
        filename: cleanFilename(input.filename),
        sizeBytes: size,
        sha256,
        objectKey,
        status: "stored",
        mapping,
        metadata: preview.metadata,
      })
      .onConflictDoNothing({ target: [uploads.stationId, uploads.sha256] })
      .returning({ id: uploads.id });
    if (!row) {
      // The same file arrived twice at once; the other request won.
      const other = await findBySha(db, station.id, sha256);
      if (other) return { upload: other, duplicate: true };
      throw new Error("upload conflict without an existing row");
    }
    inserted = true;
    await recordAudit(db, {
      actorId: caller.actorId,
      action: "upload.create",
      entityType: "upload",
      entityId: id,
      after: { stationId: station.id, filename: cleanFilename(input.filename), sizeBytes: size, sha256, via: caller.via },
    });
    if (input.queue !== false) {
      await queueImport(id);
      await db.update(uploads).set({ status: "queued" }).where(and(eq(uploads.id, id), eq(uploads.status, "stored")));
    }
    return { upload: toView((await loadView(db, id))!), duplicate: false };
  } finally {
    if (!inserted) await deleteObject(objectKey).catch(() => {});
  }
}

async function findBySha(db: Db, stationId: string, sha256: string): Promise<UploadView | null> {
  const [r] = await selectViews(db)
    .where(and(eq(uploads.stationId, stationId), eq(uploads.sha256, sha256)))
    .limit(1);
  return r ? toView(r) : null;
}

/** Uploads the signed-in person made, or that went to stations they may manage; newest first. */
export async function listUploads({ ctx, input }: { ctx: Ctx; input?: { limit?: number } }) {
  const user = requireUser(ctx);
  const limit = Math.min(Math.max(input?.limit ?? 200, 1), 500);
  const q = ctx.db
    .select({
      id: uploads.id,
      filename: uploads.filename,
      sizeBytes: uploads.sizeBytes,
      sha256: uploads.sha256,
      status: uploads.status,
      rowsRead: uploads.rowsRead,
      accepted: uploads.accepted,
      rejectedCount: uploads.rejectedCount,
      createdAt: uploads.createdAt,
      stationSlug: stations.slug,
      stationName: stations.name,
    })
    .from(uploads)
    .innerJoin(stations, eq(stations.id, uploads.stationId));
  const where =
    user.role === "admin"
      ? undefined
      : or(
          eq(uploads.uploadedBy, user.id),
          eq(stations.ownerId, user.id),
          sql`${stations.siteId} in (select ${siteStewards.siteId} from ${siteStewards} where ${siteStewards.userId} = ${user.id})`,
        );
  return (where ? q.where(where) : q).orderBy(desc(uploads.createdAt)).limit(limit);
}

/** Active stations the signed-in person may upload for: their own, their sites' (stewards), all (admins). */
export async function listUploadStations({ ctx }: { ctx: Ctx }) {
  const user = requireUser(ctx);
  const q = ctx.db
    .select({ id: stations.id, slug: stations.slug, name: stations.name, timeZone: stations.timeZone, siteName: sites.name })
    .from(stations)
    .leftJoin(sites, eq(sites.id, stations.siteId));
  const active = eq(stations.status, "active");
  const where =
    user.role === "admin"
      ? active
      : and(
          active,
          or(
            eq(stations.ownerId, user.id),
            user.role === "steward"
              ? sql`${stations.siteId} in (select ${siteStewards.siteId} from ${siteStewards} where ${siteStewards.userId} = ${user.id})`
              : sql`false`,
          ),
        );
  return q.where(where).orderBy(stations.name);
}
