/**
 * Handheld field surveys: a walk with spots; at each spot several readings, combined as their median.
 *
 * - medianMag: median of the spot's readings (mean of the two middle ones for an even count).
 * - spreadMag: the RANGE of the spot's readings (largest − smallest). With the three to five readings
 *   taken at one spot a range is what a volunteer can check by eye; a large one means the sky or the
 *   aim changed while measuring. (Night summaries use the interquartile range over a whole night.)
 * - Screening as for every reading: Sun and Moon geometric altitude at the spot and time (the shared
 *   sky cache, ingest/screening/sky-positions.ts) and the flags of ingest/screening/screen.ts with the
 *   default thresholds, applied to the median. Cloud screening needs a time series, so a spot never
 *   gets the cloud flag. Values that cannot be a night-sky reading are rejected with the spot and the
 *   reading named (validateMag), never dropped silently.
 */
import { and, asc, count, desc, eq } from "drizzle-orm";
import { z } from "zod";
import { surveyPoints, surveys } from "@/db/schema";
import { requireRole, requireUser, type Ctx } from "@/lib/auth/guard";
import { notFound } from "@/lib/errors";
import { median } from "@/lib/stats/robust";
import { skyCache } from "@/ingest/ingest";
import { screenReading, validateMag } from "@/ingest/screening/screen";
import { skyAt } from "@/ingest/screening/sky-positions";
import { checkTime } from "@/ingest/validate";

export const SKY_CONDITIONS = ["clear", "thin cloud", "partly cloudy", "overcast", "haze/fog", "snow on ground"] as const;
export type SkyCondition = (typeof SKY_CONDITIONS)[number];
export const MAX_SPOTS = 200;
export const MAX_READINGS_PER_SPOT = 20;

const ISO_WITH_OFFSET = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,9})?)?(Z|[+-]\d{2}:?\d{2})$/i;

const readingValue = z.unknown().superRefine((v, c) => {
  const n = typeof v === "string" && v.trim() !== "" ? Number(v) : v;
  const reason = n === undefined || n === null || n === "" ? "is empty; type a value in mag/arcsec² or remove it" : validateMag(n);
  if (reason) c.addIssue({ code: "custom", message: reason });
}).transform((v) => (typeof v === "string" ? Number(v) : (v as number)));

const spotSchema = z.object({
  lat: z.coerce.number({ message: "latitude must be a number" }).min(-90, "latitude must be between −90 and 90").max(90, "latitude must be between −90 and 90"),
  lon: z.coerce.number({ message: "longitude must be a number" }).min(-180, "longitude must be between −180 and 180").max(180, "longitude must be between −180 and 180"),
  takenAt: z
    .string({ message: "time is missing" })
    .trim()
    .refine((v) => ISO_WITH_OFFSET.test(v) && !Number.isNaN(Date.parse(v)), "time must be an ISO 8601 date-time with an offset")
    .superRefine((v, c) => {
      const r = checkTime(new Date(v), Date.now());
      if (typeof r === "string") c.addIssue({ code: "custom", message: r.replace(/^takenAt/, "time") });
    }),
  readings: z.array(readingValue).min(1, "add at least one reading").max(MAX_READINGS_PER_SPOT, `at most ${MAX_READINGS_PER_SPOT} readings per spot`),
  conditions: z.enum(SKY_CONDITIONS, { message: `pick the sky conditions (${SKY_CONDITIONS.join(", ")})` }),
  notes: z.string().trim().max(1000, "keep the spot's notes under 1,000 characters").default(""),
});

export const createSurveySchema = z.object({
  title: z.string().trim().min(1, "Give the walk a title.").max(200, "Keep the title under 200 characters."),
  notes: z.string().trim().max(5000, "Keep the notes under 5,000 characters.").default(""),
  spots: z.array(spotSchema).min(1, "Add at least one spot.").max(MAX_SPOTS, `At most ${MAX_SPOTS} spots per walk.`),
});

export type CreateSurveyInput = z.input<typeof createSurveySchema>;

/** Where a survey issue is, in words: "Spot 2, reading 3: …". Paths are zod's (spots.1.readings.2). */
export function describeSurveyIssue(path: ReadonlyArray<PropertyKey>, message: string): string {
  if (path[0] !== "spots" || typeof path[1] !== "number") return message;
  const spot = `Spot ${path[1] + 1}`;
  if (path[2] === "readings" && typeof path[3] === "number") return `${spot}, reading ${path[3] + 1}: ${message}`;
  return `${spot}: ${message}`;
}

/** Median and range (largest − smallest) of a spot's readings. */
export function combineSpotReadings(values: readonly number[]): { medianMag: number; spreadMag: number } {
  return { medianMag: median(values), spreadMag: Math.max(...values) - Math.min(...values) };
}

export async function createSurvey({ ctx, input }: { ctx: Ctx; input: CreateSurveyInput }) {
  const user = requireRole(ctx, "volunteer", "steward");
  const data = createSurveySchema.parse(input);
  const cache = skyCache();
  const points = data.spots.map((s) => {
    const takenAt = new Date(s.takenAt);
    const { medianMag, spreadMag } = combineSpotReadings(s.readings);
    const sky = skyAt(cache, takenAt, s.lat, s.lon);
    const flags = screenReading({ mag: medianMag, sunAltDeg: sky.sunAltDeg, moonAltDeg: sky.moonAltDeg });
    return {
      lat: s.lat,
      lon: s.lon,
      takenAt,
      values: s.readings,
      medianMag,
      spreadMag,
      sunAltDeg: sky.sunAltDeg,
      moonAltDeg: sky.moonAltDeg,
      moonFraction: sky.moonFraction,
      flags,
      conditions: s.conditions,
      notes: s.notes,
    };
  });
  return ctx.db.transaction(async (tx) => {
    const [sv] = await tx.insert(surveys).values({ userId: user.id, title: data.title, notes: data.notes }).returning();
    const rows = await tx
      .insert(surveyPoints)
      .values(points.map((p) => ({ ...p, surveyId: sv!.id })))
      .returning();
    return { survey: sv!, points: rows.sort((a, b) => a.takenAt.getTime() - b.takenAt.getTime()) };
  });
}

export async function listMySurveys({ ctx }: { ctx: Ctx }) {
  const user = requireUser(ctx);
  return ctx.db
    .select({ id: surveys.id, title: surveys.title, notes: surveys.notes, createdAt: surveys.createdAt, spots: count(surveyPoints.id) })
    .from(surveys)
    .leftJoin(surveyPoints, eq(surveyPoints.surveyId, surveys.id))
    .where(eq(surveys.userId, user.id))
    .groupBy(surveys.id)
    .orderBy(desc(surveys.createdAt));
}

/** A survey for its author or an admin; 404 for everyone else. */
export async function getSurvey({ ctx, input }: { ctx: Ctx; input: { id: string } }) {
  const user = requireUser(ctx);
  if (!z.string().uuid().safeParse(input.id).success) throw notFound("The survey");
  const [sv] = await ctx.db
    .select()
    .from(surveys)
    .where(user.role === "admin" ? eq(surveys.id, input.id) : and(eq(surveys.id, input.id), eq(surveys.userId, user.id)))
    .limit(1);
  if (!sv) throw notFound("The survey");
  const points = await ctx.db.select().from(surveyPoints).where(eq(surveyPoints.surveyId, sv.id)).orderBy(asc(surveyPoints.takenAt));
  return { survey: sv, points };
}
