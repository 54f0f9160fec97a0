/**
 * Service verbs for hearing briefs: create (queues the worker's render-brief job), list mine, download,
 * share links (create, shown once; revoke), public download by share token, verification lookup.
 * Who: advocates, stewards and admins make briefs of sites they may see (lib/sites/access.ts). A brief
 * belongs to its maker; admins may read every brief; anyone else gets 404.
 */
import { createHash, randomBytes } from "node:crypto";
import { and, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import { z } from "zod";
import { briefShares, glowEstimates, hearingBriefs, sites } from "@/db/schema";
import type { Ctx } from "@/lib/auth/guard";
import { requireRole, requireUser } from "@/lib/auth/guard";
import { recordAudit } from "@/lib/audit";
import { badRequest, notFound, unavailable } from "@/lib/errors";
import { findSiteForViewer, siteVisibleSql } from "@/lib/sites/access";
import { enqueue, QUEUES } from "@/ingest/queue";
import { BRIEF_RETRY_LIMIT, MAX_BRIEF_DAYS } from "./limits";
import { normaliseCode } from "./verification";

type Input<T> = { ctx: Ctx; input: T };

export const BRIEF_ROLES = ["advocate", "steward"] as const;
export { BRIEF_RETRY_LIMIT, MAX_BRIEF_DAYS };

const dateRe = /^\d{4}-\d{2}-\d{2}$/;
const isDate = (s: string) => dateRe.test(s) && !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s);

export const createBriefSchema = z
  .object({
    sites: z.array(z.string().regex(/^[a-z0-9-]{1,80}$/, "sites must be site slugs")).min(1, "Choose at least one site").max(5, "At most 5 sites in one brief"),
    from: z.string().refine(isDate, "from must be a date, YYYY-MM-DD"),
    to: z.string().refine(isDate, "to must be a date, YYYY-MM-DD"),
    glowEstimateIds: z.array(z.string().uuid("glowEstimateIds must be ids of saved estimates")).max(10).default([]),
  })
  .refine((v) => v.from <= v.to, { path: ["to"], message: "The period must end on or after its start" })
  .refine((v) => (Date.parse(v.to) - Date.parse(v.from)) / 86_400_000 <= MAX_BRIEF_DAYS, { path: ["from"], message: "A brief covers at most three years" });
export type CreateBriefInput = z.input<typeof createBriefSchema>;

export type BriefListItem = {
  id: string;
  sites: { slug: string; name: string }[];
  from: string;
  to: string;
  status: "queued" | "rendering" | "done" | "failed";
  progress: number;
  error: string | null;
  sizeBytes: number | null;
  sha256: string | null;
  verificationCode: string | null;
  glowEstimates: number;
  createdAt: string;
  finishedAt: string | null;
  renderMs: number | null;
  shares: { id: string; createdAt: string; revokedAt: string | null }[];
};

export async function createBrief({ ctx, input }: Input<CreateBriefInput>): Promise<{ id: string }> {
  const user = requireRole(ctx, ...BRIEF_ROLES);
  const v = createBriefSchema.parse(input);
  const siteIds: string[] = [];
  for (const slug of [...new Set(v.sites)]) {
    const { site } = await findSiteForViewer({ ctx, input: { slug } });
    siteIds.push(site.id);
  }
  if (v.glowEstimateIds.length) {
    const own = await ctx.db
      .select({ id: glowEstimates.id })
      .from(glowEstimates)
      .where(and(inArray(glowEstimates.id, v.glowEstimateIds), user.role === "admin" ? sql`TRUE` : eq(glowEstimates.createdBy, user.id)));
    if (own.length !== new Set(v.glowEstimateIds).size) throw badRequest("glowEstimateIds: one of the glow estimates is not one of your saved estimates.");
  }
  const [row] = await ctx.db
    .insert(hearingBriefs)
    .values({ createdBy: user.id, siteIds, periodFrom: v.from, periodTo: v.to, params: { glowEstimateIds: [...new Set(v.glowEstimateIds)] } })
    .returning({ id: hearingBriefs.id });
  try {
    await enqueue(QUEUES.renderBrief, { briefId: row!.id }, { retryLimit: BRIEF_RETRY_LIMIT, retryDelay: 5, retryBackoff: true });
  } catch (err) {
    // Not queued: say so on the row (nothing silently waits forever) and tell the caller to retry.
    await ctx.db.update(hearingBriefs).set({ status: "failed", error: "Could not be queued for rendering; make the brief again." }).where(eq(hearingBriefs.id, row!.id));
    console.error("[briefs] enqueue failed", (err as Error).message);
    throw unavailable("The rendering queue is not reachable right now. Try again shortly.");
  }
  return { id: row!.id };
}

export async function listMyBriefs({ ctx }: { ctx: Ctx }): Promise<BriefListItem[]> {
  const user = requireRole(ctx, ...BRIEF_ROLES);
  const rows = await ctx.db
    .select({
      id: hearingBriefs.id,
      siteIds: hearingBriefs.siteIds,
      from: hearingBriefs.periodFrom,
      to: hearingBriefs.periodTo,
      status: hearingBriefs.status,
      progress: hearingBriefs.progress,
      error: hearingBriefs.error,
      sizeBytes: hearingBriefs.sizeBytes,
      sha256: hearingBriefs.sha256,
      verificationCode: hearingBriefs.verificationCode,
      params: hearingBriefs.params,
      createdAt: hearingBriefs.createdAt,
      finishedAt: hearingBriefs.finishedAt,
      renderMs: hearingBriefs.renderMs,
    })
    .from(hearingBriefs)
    .where(eq(hearingBriefs.createdBy, user.id))
    .orderBy(desc(hearingBriefs.createdAt))
    .limit(100);
  const allSiteIds = [...new Set(rows.flatMap((r) => r.siteIds))];
  const siteRows = allSiteIds.length ? await ctx.db.select({ id: sites.id, slug: sites.slug, name: sites.name }).from(sites).where(inArray(sites.id, allSiteIds)) : [];
  const shareRows = rows.length
    ? await ctx.db
        .select({ id: briefShares.id, briefId: briefShares.briefId, createdAt: briefShares.createdAt, revokedAt: briefShares.revokedAt })
        .from(briefShares)
        .where(inArray(briefShares.briefId, rows.map((r) => r.id)))
        .orderBy(briefShares.createdAt)
    : [];
  return rows.map((r) => ({
    id: r.id,
    sites: r.siteIds.map((id) => siteRows.find((s) => s.id === id)).filter((s): s is NonNullable<typeof s> => !!s).map((s) => ({ slug: s.slug, name: s.name })),
    from: r.from,
    to: r.to,
    status: r.status,
    progress: r.progress,
    error: r.error,
    sizeBytes: r.sizeBytes,
    sha256: r.sha256,
    verificationCode: r.verificationCode,
    glowEstimates: r.params.glowEstimateIds.length,
    createdAt: r.createdAt.toISOString(),
    finishedAt: r.finishedAt?.toISOString() ?? null,
    renderMs: r.renderMs,
    shares: shareRows.filter((s) => s.briefId === r.id).map((s) => ({ id: s.id, createdAt: s.createdAt.toISOString(), revokedAt: s.revokedAt?.toISOString() ?? null })),
  }));
}

const uuidRe = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** The caller's own brief (admins: any brief), else 404. */
async function ownBrief(ctx: Ctx, id: string) {
  const user = requireUser(ctx);
  if (!uuidRe.test(id)) throw notFound("The brief");
  const [row] = await ctx.db.select().from(hearingBriefs).where(eq(hearingBriefs.id, id)).limit(1);
  if (!row || (row.createdBy !== user.id && user.role !== "admin")) throw notFound("The brief");
  return { row, user };
}

export type BriefFile = { bytes: Buffer; filename: string; sha256: string; code: string };

function fileOf(row: typeof hearingBriefs.$inferSelect, slugs: string[]): BriefFile {
  if (row.status !== "done" || !row.pdf) throw notFound("The brief's PDF (it is not ready yet)");
  return {
    bytes: row.pdf,
    filename: `nightmark-brief-${slugs.join("+") || "sites"}-${row.periodFrom}-${row.periodTo}.pdf`,
    sha256: row.sha256 ?? "",
    code: row.verificationCode ?? "",
  };
}

async function slugsOf(ctx: Pick<Ctx, "db">, ids: string[]) {
  if (!ids.length) return [];
  const rows = await ctx.db.select({ id: sites.id, slug: sites.slug }).from(sites).where(inArray(sites.id, ids));
  return ids.map((id) => rows.find((r) => r.id === id)?.slug).filter((s): s is string => !!s);
}

export async function getBriefPdf({ ctx, input }: Input<{ id: string }>): Promise<BriefFile> {
  const { row } = await ownBrief(ctx, input.id);
  return fileOf(row, await slugsOf(ctx, row.siteIds));
}

export const hashShareToken = (token: string) => createHash("sha256").update(token, "utf8").digest("hex");

export async function createShare({ ctx, input }: Input<{ id: string }>): Promise<{ id: string; token: string; path: string }> {
  const { row, user } = await ownBrief(ctx, input.id);
  if (row.status !== "done") throw badRequest("The brief is not ready yet: share it once it is done.");
  // 256 random bits: a fast hash is enough to store it (as station tokens, lib/stations/tokens.ts).
  const token = randomBytes(32).toString("base64url");
  const share = await ctx.db.transaction(async (tx) => {
    const [s] = await tx.insert(briefShares).values({ briefId: row.id, tokenHash: hashShareToken(token), createdBy: user.id }).returning({ id: briefShares.id });
    await recordAudit(tx, { actorId: user.id, action: "brief.share.create", entityType: "brief", entityId: row.id, after: { shareId: s!.id } });
    return s!;
  });
  return { id: share.id, token, path: `/api/v1/briefs/shared/${token}` };
}

export async function revokeShare({ ctx, input }: Input<{ id: string; shareId: string }>): Promise<{ revoked: true }> {
  const { row, user } = await ownBrief(ctx, input.id);
  if (!uuidRe.test(input.shareId)) throw notFound("The share link");
  await ctx.db.transaction(async (tx) => {
    const [s] = await tx
      .update(briefShares)
      .set({ revokedAt: new Date() })
      .where(and(eq(briefShares.id, input.shareId), eq(briefShares.briefId, row.id), isNull(briefShares.revokedAt)))
      .returning({ id: briefShares.id });
    if (!s) {
      const [exists] = await tx.select({ id: briefShares.id }).from(briefShares).where(and(eq(briefShares.id, input.shareId), eq(briefShares.briefId, row.id)));
      if (!exists) throw notFound("The share link");
      return; // already revoked: revoking again is a no-op
    }
    await recordAudit(tx, { actorId: user.id, action: "brief.share.revoke", entityType: "brief", entityId: row.id, after: { shareId: s.id } });
  });
  return { revoked: true };
}

/** Public: the PDF behind a share token; 404 for an unknown or revoked token. */
export async function getSharedBriefPdf({ ctx, input }: Input<{ token: string }>): Promise<BriefFile> {
  if (!/^[A-Za-z0-9_-]{20,100}$/.test(input.token)) throw notFound("The shared brief");
  const [row] = await ctx.db
    .select({ brief: hearingBriefs })
    .from(briefShares)
    .innerJoin(hearingBriefs, eq(hearingBriefs.id, briefShares.briefId))
    .where(and(eq(briefShares.tokenHash, hashShareToken(input.token)), isNull(briefShares.revokedAt)))
    .limit(1);
  if (!row) throw notFound("The shared brief");
  return fileOf(row.brief, await slugsOf(ctx, row.brief.siteIds));
}

export type VerificationResult = {
  code: string;
  briefs: { sites: { slug: string; name: string }[]; from: string; to: string; generatedAt: string; softwareVersion: string; dataSha256: string; pdfSha256: string | null; nightRows: number; stations: number }[];
};

/** Public: which data a verification code maps to (no personal data: no maker, no positions). */
export async function verifyCode({ ctx, input }: Input<{ code: string }>): Promise<VerificationResult> {
  const code = normaliseCode(input.code);
  if (!code) throw notFound("A brief with this verification code");
  const rows = await ctx.db
    .select({ verification: hearingBriefs.verification, sha256: hearingBriefs.sha256 })
    .from(hearingBriefs)
    .where(and(eq(hearingBriefs.verificationCode, code), eq(hearingBriefs.status, "done")))
    .orderBy(hearingBriefs.finishedAt)
    .limit(50);
  const briefs = rows
    .filter((r) => r.verification)
    .map((r) => ({
      sites: r.verification!.sites,
      from: r.verification!.from,
      to: r.verification!.to,
      generatedAt: r.verification!.generatedAt,
      softwareVersion: r.verification!.softwareVersion,
      dataSha256: r.verification!.dataSha256,
      pdfSha256: r.sha256,
      nightRows: r.verification!.nightRows,
      stations: r.verification!.stations,
    }));
  if (!briefs.length) throw notFound("A brief with this verification code");
  return { code, briefs };
}

/** The form's default period: the last 12 months, ending today (UTC date). */
export function defaultBriefPeriod(now = new Date()): { from: string; to: string } {
  const to = now.toISOString().slice(0, 10);
  const d = new Date(`${to}T00:00:00Z`);
  d.setUTCFullYear(d.getUTCFullYear() - 1);
  d.setUTCDate(d.getUTCDate() + 1);
  return { from: d.toISOString().slice(0, 10), to };
}

/** Sites the caller may make a brief of (the form's choices). */
export async function briefSiteChoices({ ctx }: { ctx: Ctx }) {
  const user = requireRole(ctx, ...BRIEF_ROLES);
  const rows = await ctx.db.execute<{ slug: string; name: string }>(sql`
    SELECT si.slug, si.name FROM sites si
     WHERE ${siteVisibleSql(user)}
     ORDER BY si.name`);
  return rows.rows;
}
