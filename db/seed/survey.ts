/**
 * A small invented field survey for the demo: volunteer2 walks five spots in Cedar Basin Park two
 * nights ago, from 21:30 local time, three readings a spot. Screened like every survey spot
 * (lib/surveys/service.ts): Sun and Moon from the shared sky cache, flags from screenReading.
 * Call once from db/seed/index.ts after the base scenario; it records itself in app_meta.
 */
import { eq } from "drizzle-orm";
import { DateTime } from "luxon";
import type { Db } from "../index";
import { surveyPoints, surveys, users } from "../schema";
import { skyCache } from "@/ingest/ingest";
import { addDays, nightOf } from "@/ingest/night";
import { screenReading } from "@/ingest/screening/screen";
import { skyAt } from "@/ingest/screening/sky-positions";
import { combineSpotReadings } from "@/lib/surveys/service";

type Helpers = { db: Db; done: (key: string) => Promise<boolean>; mark: (key: string, value: unknown) => Promise<void> };

const ZONE = "America/Phoenix";
/** Spots inside the park's boundary (db/seed/scenario.ts, centre −111.78, 34.62), walking away from the town. */
const SPOTS: { lon: number; lat: number; values: number[]; conditions: string; notes: string }[] = [
  { lon: -111.795, lat: 34.628, values: [21.08, 21.12, 21.1], conditions: "clear", notes: "Car park by the visitor centre, lamps off" },
  { lon: -111.781, lat: 34.621, values: [21.21, 21.24, 21.19], conditions: "clear", notes: "Picnic meadow" },
  { lon: -111.767, lat: 34.613, values: [21.3, 21.33, 21.29], conditions: "clear", notes: "Wash crossing, town glow low in the west" },
  { lon: -111.752, lat: 34.606, values: [21.36, 21.41, 21.38], conditions: "thin cloud", notes: "Thin cloud drifting in from the south" },
  { lon: -111.741, lat: 34.598, values: [21.2, 21.44, 21.31], conditions: "partly cloudy", notes: "Readings jumped as cloud passed" },
];

export async function seedSurveyExample({ db, done, mark }: Helpers) {
  const key = "seed:survey-example";
  if (await done(key)) return;
  const [walker] = await db.select({ id: users.id }).from(users).where(eq(users.email, "volunteer2@demo.nightmark.example")).limit(1);
  if (!walker) return console.log("[seed] survey example skipped: volunteer2 is not in the database");
  const night = addDays(nightOf(new Date(), ZONE), -2);
  const start = DateTime.fromISO(`${night}T21:30`, { zone: ZONE });
  const cache = skyCache();
  const surveyId = await db.transaction(async (tx) => {
    const [sv] = await tx
      .insert(surveys)
      .values({ userId: walker.id, title: "Cedar Basin Park, west to east", notes: "Five spots from the visitor centre towards the dark eastern edge; with a partner, ranger told of our return time." })
      .returning({ id: surveys.id });
    await tx.insert(surveyPoints).values(
      SPOTS.map((s, i) => {
        const takenAt = start.plus({ minutes: 12 * i }).toJSDate();
        const { medianMag, spreadMag } = combineSpotReadings(s.values);
        const sky = skyAt(cache, takenAt, s.lat, s.lon);
        return {
          surveyId: sv!.id,
          lat: s.lat,
          lon: s.lon,
          takenAt,
          values: s.values,
          medianMag,
          spreadMag,
          sunAltDeg: sky.sunAltDeg,
          moonAltDeg: sky.moonAltDeg,
          moonFraction: sky.moonFraction,
          flags: screenReading({ mag: medianMag, sunAltDeg: sky.sunAltDeg, moonAltDeg: sky.moonAltDeg }),
          conditions: s.conditions,
          notes: s.notes,
        };
      }),
    );
    return sv!.id;
  });
  await mark(key, { surveyId, night });
  console.log(`[seed] survey example: 5 spots in Cedar Basin Park on the night of ${night}`);
}
