/**
 * Calibration offsets of a station: added to raw values when nights are summarised (ingest/summarise.ts
 * calibrationOffsetAt), never written into readings. Adding one re-marks the station's nights on or
 * after its effective date, so the worker recomputes their summaries with the new offset.
 */
import { and, desc, eq, sql } from "drizzle-orm";
import { z } from "zod";
import { calibrations, stations, users } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import { requireUser, type Ctx } from "@/lib/auth/guard";
import { conflict, notFound } from "@/lib/errors";
import { canManageStation } from "./tokens";

export async function listCalibrations(ctx: Pick<Ctx, "db">, stationId: string) {
  return ctx.db
    .select({
      id: calibrations.id,
      effectiveFrom: calibrations.effectiveFrom,
      offsetMag: calibrations.offsetMag,
      note: calibrations.note,
      createdAt: calibrations.createdAt,
      createdByName: users.name,
    })
    .from(calibrations)
    .leftJoin(users, eq(users.id, calibrations.createdBy))
    .where(eq(calibrations.stationId, stationId))
    .orderBy(desc(calibrations.effectiveFrom));
}

/** Offsets beyond ±2 mag are not a calibration but a different instrument or a mistake. */
export const MAX_CALIBRATION_OFFSET_MAG = 2;

export const addCalibrationSchema = z.object({
  stationSlug: z.string().min(1, "Which station?"),
  effectiveFrom: z
    .string()
    .trim()
    .regex(/^\d{4}-\d{2}-\d{2}$/, "Give the first night it applies to, as YYYY-MM-DD.")
    .refine((v) => !Number.isNaN(Date.parse(`${v}T00:00:00Z`)) && new Date(`${v}T00:00:00Z`).toISOString().startsWith(v), "That is not a real date."),
  offsetMag: z.coerce
    .number({ message: "The offset must be a number (mag/arcsec²)." })
    .refine(Number.isFinite, "The offset must be a number (mag/arcsec²).")
    .refine((v) => Math.abs(v) <= MAX_CALIBRATION_OFFSET_MAG, `The offset must be between −${MAX_CALIBRATION_OFFSET_MAG} and +${MAX_CALIBRATION_OFFSET_MAG} mag/arcsec².`),
  note: z.string().trim().max(500, "Keep the note under 500 characters.").default(""),
});

export type AddCalibrationInput = z.input<typeof addCalibrationSchema>;

export async function addCalibration({ ctx, input }: { ctx: Ctx; input: AddCalibrationInput }) {
  const user = requireUser(ctx);
  const [st] = await ctx.db.select().from(stations).where(eq(stations.slug, String(input?.stationSlug ?? ""))).limit(1);
  if (!st || !(await canManageStation(ctx, st))) throw notFound("The station");
  const data = addCalibrationSchema.parse(input);
  return ctx.db.transaction(async (tx) => {
    const [existing] = await tx
      .select({ id: calibrations.id })
      .from(calibrations)
      .where(and(eq(calibrations.stationId, st.id), eq(calibrations.effectiveFrom, data.effectiveFrom)))
      .limit(1);
    if (existing) throw conflict(`This station already has a calibration from ${data.effectiveFrom}; pick another date.`, { field: "effectiveFrom" });
    const [row] = await tx
      .insert(calibrations)
      .values({ stationId: st.id, effectiveFrom: data.effectiveFrom, offsetMag: data.offsetMag, note: data.note, createdBy: user.id })
      .returning();
    await recordAudit(tx, {
      actorId: user.id,
      action: "calibration.add",
      entityType: "calibration",
      entityId: row!.id,
      after: { stationId: st.id, stationSlug: st.slug, effectiveFrom: data.effectiveFrom, offsetMag: data.offsetMag, note: data.note },
    });
    // The nights this offset can change; the worker re-summarises them (ingest/summaries.ts).
    const marked = await tx.execute<{ n: number }>(sql`
      WITH m AS (
        INSERT INTO dirty_nights (station_id, night)
        SELECT station_id, night FROM night_summaries WHERE station_id = ${st.id}::uuid AND night >= ${data.effectiveFrom}::date
        ON CONFLICT (station_id, night) DO UPDATE SET marked_at = now()
        RETURNING 1
      ) SELECT count(*)::int AS n FROM m`);
    return { ...row!, nightsMarked: marked.rows[0]?.n ?? 0 };
  });
}
