/**
 * The demo scenario's readings: for every station with a model (db/seed/scenario.ts), nights from
 * the model in db/seed/model.ts, stored through the same ingest code as every other path
 * (ingest/ingest.ts: screening, idempotent insert, night marking), then summarised.
 * Each station records itself in app_meta when complete, so an interrupted seed resumes.
 */
import { eq } from "drizzle-orm";
import type { Db } from "../index";
import { calibrations, stations } from "../schema";
import { storeReadings } from "@/ingest/ingest";
import { addDays, nightOf } from "@/ingest/night";
import { summariseDirtyNights } from "@/ingest/summaries";
import type { ValidReading } from "@/ingest/validate";
import { simulateStationRange } from "./model";
import { SCENARIO_STATIONS } from "./scenario";

export type SeedProfile = "demo" | "test";

/** Demo: 400 nights (over a year, for trends and seasons) at the meters' one-minute cadence. Test: the same nights every 5 minutes. */
const PROFILES: Record<SeedProfile, { nights: number; cadenceMin: number }> = {
  demo: { nights: 400, cadenceMin: 1 },
  test: { nights: 400, cadenceMin: 5 },
};

type Helpers = {
  db: Db;
  profile: SeedProfile;
  done: (key: string) => Promise<boolean>;
  mark: (key: string, value: unknown) => Promise<void>;
};

export async function seedReadings({ db, profile, done, mark }: Helpers) {
  const { nights, cadenceMin } = PROFILES[profile];
  const now = Date.now();
  const modelled = SCENARIO_STATIONS.filter((s) => s.model);
  let i = 0;
  for (const sc of modelled) {
    i++;
    const key = `seed:readings:${sc.slug}`;
    if (await done(key)) continue;
    const [st] = await db.select().from(stations).where(eq(stations.slug, sc.slug)).limit(1);
    if (!st) continue;
    const model = sc.model!;
    const lastNight = addDays(nightOf(new Date(now), st.timeZone), -1);
    const firstNight = addDays(lastNight, -(nights - 1));
    if (model.calibrationOffsetMag)
      await db
        .insert(calibrations)
        .values({ stationId: st.id, effectiveFrom: firstNight, offsetMag: model.calibrationOffsetMag, note: "Factory calibration against a reference meter" })
        .onConflictDoNothing();
    const started = Date.now();
    let stored = 0;
    let batch: ValidReading[] = [];
    const flush = async () => {
      if (batch.length === 0) return;
      const r = await storeReadings({ id: st.id, lat: st.lat, lon: st.lon, timeZone: st.timeZone, thresholds: {} }, batch, { source: "seed" });
      stored += r.accepted;
      batch = [];
    };
    for (const { readings } of simulateStationRange({
      station: { lat: st.lat, lon: st.lon, timeZone: st.timeZone },
      seed: hashSeed(sc.slug),
      baseMag: model.baseMag,
      brighteningMagPerYear: model.brighteningMagPerYear,
      step: model.step ? { fromNight: addDays(lastNight, -model.step.fromDaysAgo), deltaMag: model.step.deltaMag } : undefined,
      cadenceMin,
      startDate: firstNight,
      fromNight: firstNight,
      toNight: lastNight,
    })) {
      for (const r of readings) {
        if (r.takenAt.getTime() > now) continue;
        batch.push({ index: batch.length, takenAt: r.takenAt, mag: r.mag, tempC: r.tempC });
      }
      if (batch.length >= 5000) await flush();
    }
    await flush();
    await mark(key, { readings: stored, firstNight, lastNight, cadenceMin });
    console.log(`[seed] station ${i}/${modelled.length} ${sc.slug}: ${stored} readings in ${((Date.now() - started) / 1000).toFixed(1)} s`);
  }
  // Summarise everything the readings touched, so the demo's pages have numbers at once.
  const started = Date.now();
  let total = 0;
  for (;;) {
    const r = await summariseDirtyNights(200, 0);
    total += r.nights;
    if (r.nights === 0) break;
  }
  if (total > 0) console.log(`[seed] summarised ${total} station-nights in ${((Date.now() - started) / 1000).toFixed(1)} s`);
}

function hashSeed(s: string): number {
  let h = 2166136261;
  for (let i = 0; i < s.length; i++) h = Math.imul(h ^ s.charCodeAt(i), 16777619);
  return h >>> 0;
}

/**
 * The demo's example upload: an invented 3-night log file (db/seed/log-file.ts, from the model) for
 * the station "backyard-new-meter", stored through the upload service (object store + uploads row,
 * the same code as POST /api/v1/stations/:slug/uploads) and imported inline. Needs the S3 fake to be
 * running; without it the example is skipped with a message (and made on the next seed). Runs once:
 * a done upload of this file name on that station is left alone.
 */
export async function seedUploadExample({ db }: { db: Db }) {
  const { uploads } = await import("../schema");
  const { and } = await import("drizzle-orm");
  const { storeUpload } = await import("@/lib/uploads/service");
  const { importUpload } = await import("@/ingest/import-upload");
  const { demoLogLines, lastNights } = await import("./log-file");
  const FILENAME = "backyard-meter-3-nights.csv";
  const [st] = await db.select().from(stations).where(eq(stations.slug, "backyard-new-meter")).limit(1);
  if (!st) return;
  const [prior] = await db
    .select({ id: uploads.id, status: uploads.status })
    .from(uploads)
    .where(and(eq(uploads.stationId, st.id), eq(uploads.filename, FILENAME)))
    .limit(1);
  if (prior?.status === "done") return;
  const now = new Date();
  const nights = lastNights(now, st.timeZone, 3);
  const text = [...demoLogLines({ station: { ...st }, seed: hashSeed(st.slug), baseMag: 21.3, ...nights, notAfter: now })].join("");
  try {
    const { upload } = prior
      ? { upload: { id: prior.id } }
      : await storeUpload({
          db,
          station: st,
          caller: { actorId: st.ownerId, via: "session" },
          filename: FILENAME,
          body: [Buffer.from(text, "utf8")],
          queue: false,
        });
    const r = await importUpload(upload.id);
    console.log(`[seed] example upload ${FILENAME}: ${r.rowsRead} rows, ${r.accepted} accepted, ${r.duplicates} duplicates, ${r.rejectedCount} rejected`);
  } catch (err) {
    const e = err as { code?: string; name?: string; message?: string };
    if (e.code === "ECONNREFUSED" || /ECONNREFUSED/.test(String(e.message)))
      return console.log("[seed] example upload skipped: the S3 fake is not running (it is made on the next seed)");
    throw err;
  }
}
