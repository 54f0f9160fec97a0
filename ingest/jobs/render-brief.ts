/**
 * render-brief: gathers a hearing brief's data (lib/briefs/data.ts), renders the PDF
 * (lib/briefs/render.tsx) and stores it in hearing_briefs.pdf, updating `progress` (10 → 40 → 80 → 100)
 * so the briefs page can show it. A failure is written on the row and rethrown, so pg-boss retries the
 * job (BRIEF_RETRY_LIMIT times, with backoff); the row says "failed" only after the last attempt.
 */
import { createHash } from "node:crypto";
import { eq, sql } from "drizzle-orm";
import { z } from "zod";
import { getDb } from "@/db";
import { hearingBriefs } from "@/db/schema";
import { gatherBriefData } from "@/lib/briefs/data";
import { renderBriefPdf } from "@/lib/briefs/render";
import { BRIEF_RETRY_LIMIT } from "@/lib/briefs/limits";
import { QUEUES } from "../queue";
import type { JobDefinition } from "./types";

const payloadSchema = z.object({ briefId: z.string().uuid() });

export async function renderBrief(briefId: string): Promise<void> {
  const db = getDb();
  const [claimed] = await db
    .update(hearingBriefs)
    .set({ status: "rendering", progress: 10, attempts: sql`${hearingBriefs.attempts} + 1`, startedAt: new Date() })
    .where(eq(hearingBriefs.id, briefId))
    .returning();
  if (!claimed) return; // deleted meanwhile: nothing to do
  if (claimed.pdf && claimed.verificationCode) {
    // A retry after the PDF was stored (the job's completion was lost): just finish.
    await db.update(hearingBriefs).set({ status: "done", progress: 100, error: null }).where(eq(hearingBriefs.id, briefId));
    return;
  }
  const started = Date.now();
  try {
    const data = await gatherBriefData(db, {
      siteIds: claimed.siteIds,
      from: claimed.periodFrom,
      to: claimed.periodTo,
      glowEstimateIds: claimed.params.glowEstimateIds,
    });
    await db.update(hearingBriefs).set({ progress: 40 }).where(eq(hearingBriefs.id, briefId));
    const pdf = await renderBriefPdf(data);
    await db.update(hearingBriefs).set({ progress: 80 }).where(eq(hearingBriefs.id, briefId));
    await db
      .update(hearingBriefs)
      .set({
        status: "done",
        progress: 100,
        error: null,
        pdf,
        sizeBytes: pdf.length,
        sha256: createHash("sha256").update(pdf).digest("hex"),
        verificationCode: data.verification.code,
        verification: {
          sites: data.sites.map((s) => ({ slug: s.site.slug, name: s.site.name })),
          from: claimed.periodFrom,
          to: claimed.periodTo,
          generatedAt: data.generatedAt,
          softwareVersion: data.softwareVersion,
          dataSha256: data.verification.sha256,
          nightRows: data.verification.nightRows,
          stations: data.verification.stations,
        },
        renderMs: Date.now() - started,
        finishedAt: new Date(),
      })
      .where(eq(hearingBriefs.id, briefId));
    console.log(`[render-brief] ${briefId}: ${pdf.length} bytes in ${Date.now() - started} ms`);
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    const attempts = claimed.attempts;
    const last = attempts > BRIEF_RETRY_LIMIT;
    await db
      .update(hearingBriefs)
      .set({
        status: last ? "failed" : "queued",
        progress: 0,
        error: last ? `Rendering failed after ${attempts} attempts: ${message}` : `Attempt ${attempts} failed (${message}); retrying.`,
        finishedAt: last ? new Date() : null,
      })
      .where(eq(hearingBriefs.id, briefId))
      .catch(() => {});
    console.error(`[render-brief] ${briefId} attempt ${attempts} failed:`, message);
    throw err;
  }
}

export const renderBriefJob: JobDefinition<{ briefId: string }> = {
  name: QUEUES.renderBrief,
  queue: { retryLimit: BRIEF_RETRY_LIMIT, retryDelay: 5, retryBackoff: true },
  handler: async (data) => {
    const { briefId } = payloadSchema.parse(data);
    await renderBrief(briefId);
  },
};
