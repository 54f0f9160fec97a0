/**
 * The survey verb (lib/surveys/service.ts createSurvey, what the /surveys/new server action calls)
 * against the real database: spots are stored with the median and spread of their readings, screened
 * for Sun and Moon, and a bad reading is rejected naming its spot and index, with nothing stored.
 */
import { eq, inArray } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ZodError } from "zod";
import { getDb } from "@/db";
import { surveyPoints, surveys, users } from "@/db/schema";
import { naiveSkyAt } from "@/ingest/screening/sky-positions";
import type { Ctx, CurrentUser } from "@/lib/auth/guard";
import { AppError } from "@/lib/errors";
import { createSurvey, describeSurveyIssue, getSurvey } from "@/lib/surveys/service";
import { demoAccount } from "../helpers/session";

let ctx: Ctx;
let advocate: Ctx;
const created: string[] = [];

async function ctxFor(email: string): Promise<Ctx> {
  const [u] = await getDb().select({ id: users.id, email: users.email, name: users.name, role: users.role }).from(users).where(eq(users.email, email));
  return { user: u as CurrentUser, db: getDb() };
}

beforeAll(async () => {
  ctx = await ctxFor(demoAccount("volunteer").email);
  advocate = await ctxFor(demoAccount("advocate").email);
});

afterAll(async () => {
  if (created.length) await getDb().delete(surveys).where(inArray(surveys.id, created));
});

// Cedar Basin Park (db/seed/scenario.ts), America/Phoenix = UTC−7 all year (no daylight saving).
const PARK = { lat: 34.62, lon: -111.78 };

describe("createSurvey", () => {
  it("stores each spot with the median of its readings and their spread (largest − smallest)", async () => {
    const r = await createSurvey({
      ctx,
      input: {
        title: "Integration walk",
        notes: "made by tests/integration/surveys.test.ts",
        spots: [
          // 23:00 local on 2026-01-15 = 06:00 UTC on the 16th.
          { ...PARK, takenAt: "2026-01-16T06:00:00Z", readings: [21.1, 21.3, 21.2], conditions: "clear", notes: "first" },
          // Even count: the median is the mean of the two middle values.
          { lat: 34.61, lon: -111.77, takenAt: "2026-01-16T06:20:00Z", readings: ["21.0", "21.4", "21.1", "21.3"], conditions: "thin cloud" },
          // Local noon (19:00 UTC): the Sun is up in January at 34.6° N (common knowledge), so "daylight".
          { ...PARK, takenAt: "2026-01-15T19:00:00Z", readings: [12.5], conditions: "clear" },
        ],
      },
    });
    created.push(r.survey.id);
    const { points } = await getSurvey({ ctx, input: { id: r.survey.id } });
    expect(points).toHaveLength(3);
    const byNote = (t: string) => points.find((p) => p.takenAt.toISOString() === t)!;

    const a = byNote("2026-01-16T06:00:00.000Z");
    // Arithmetic: sorted 21.1, 21.2, 21.3 → median 21.2; range 21.3 − 21.1 = 0.2.
    expect(a.values).toEqual([21.1, 21.3, 21.2]);
    expect(a.medianMag).toBeCloseTo(21.2, 5);
    expect(a.spreadMag).toBeCloseTo(0.2, 5);
    expect(a.conditions).toBe("clear");

    const b = byNote("2026-01-16T06:20:00.000Z");
    // Arithmetic: sorted 21.0, 21.1, 21.3, 21.4 → (21.1 + 21.3) / 2 = 21.2; range 0.4.
    expect(b.medianMag).toBeCloseTo(21.2, 5);
    expect(b.spreadMag).toBeCloseTo(0.4, 5);

    // Sun and Moon as the reference per-reading suncalc computation gives them (within the cache's 1e-6°, stored as real).
    for (const p of [a, b]) {
      const ref = naiveSkyAt(p.takenAt, p.lat, p.lon);
      expect(p.sunAltDeg).toBeCloseTo(ref.sunAltDeg, 3);
      expect(p.moonAltDeg).toBeCloseTo(ref.moonAltDeg, 3);
      expect(p.moonFraction).toBeCloseTo(ref.moonFraction, 4);
    }
    // 23:00 local in January is well past astronomical twilight (Sun far below −18°).
    expect(a.sunAltDeg).toBeLessThan(-18);

    const noon = byNote("2026-01-15T19:00:00.000Z");
    expect(noon.sunAltDeg).toBeGreaterThan(0);
    expect(noon.flags & 1).toBe(1); // DAYLIGHT (lib/flags.ts)
  });

  it("rejects a bad reading naming its spot and index, and stores nothing", async () => {
    const before = (await getDb().select({ id: surveys.id }).from(surveys).where(eq(surveys.userId, ctx.user!.id))).length;
    let err: unknown;
    try {
      await createSurvey({
        ctx,
        input: {
          title: "Should not be stored",
          spots: [
            { ...PARK, takenAt: "2026-01-16T06:00:00Z", readings: [21.1], conditions: "clear" },
            { ...PARK, takenAt: "2026-01-16T06:10:00Z", readings: [21.2, 21.3, 30], conditions: "clear" },
          ],
        },
      });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(ZodError);
    const issue = (err as ZodError).issues[0]!;
    expect(issue.path).toEqual(["spots", 1, "readings", 2]);
    const sentence = describeSurveyIssue(issue.path, issue.message);
    expect(sentence).toMatch(/^Spot 2, reading 3: mag 30 is darker than 24 mag\/arcsec²/);
    const after = (await getDb().select({ id: surveys.id }).from(surveys).where(eq(surveys.userId, ctx.user!.id))).length;
    expect(after).toBe(before);
  });

  it("rejects a reading that is not a number, a missing position and an unknown sky condition", async () => {
    const res = await createSurvey({
      ctx,
      input: { title: "x", spots: [{ lat: 95, lon: -111, takenAt: "2026-01-16T06:00:00Z", readings: ["21.1", "abc"], conditions: "foggy" as never }] },
    }).catch((e: unknown) => e);
    expect(res).toBeInstanceOf(ZodError);
    const paths = (res as ZodError).issues.map((i) => i.path.join("."));
    expect(paths).toEqual(expect.arrayContaining(["spots.0.lat", "spots.0.readings.1", "spots.0.conditions"]));
  });

  it("is for volunteers and stewards; a survey is visible only to its author (or an admin)", async () => {
    await expect(createSurvey({ ctx: advocate, input: { title: "x", spots: [] } })).rejects.toMatchObject({ status: 403 });
    const other = await ctxFor("volunteer2@demo.nightmark.example");
    const id = created[0]!;
    const e = await getSurvey({ ctx: other, input: { id } }).catch((x: unknown) => x);
    expect(e).toBeInstanceOf(AppError);
    expect((e as AppError).status).toBe(404);
    const pts = await getDb().select().from(surveyPoints).where(eq(surveyPoints.surveyId, id));
    expect(pts.length).toBe(3);
  });
});
