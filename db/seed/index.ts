/**
 * Loads the demo scenario (db/seed/scenario.ts) once. Never writes over existing data: each part
 * records itself in app_meta when complete, and a database that already has sites or users from
 * elsewhere is left alone. SEED_PROFILE=test loads a shorter history for the test suite.
 */
import { eq, sql } from "drizzle-orm";
import { getDb, pool } from "../index";
import { appMeta, siteStewards, sites, stations, users } from "../schema";
import { hashPassword } from "@/lib/auth/password";
import accounts from "./demo-accounts.json" with { type: "json" };
import { seedReadings, seedUploadExample } from "./readings";
import { SCENARIO_SITES, SCENARIO_STATIONS, sitePolygon } from "./scenario";
import { seedSurveyExample } from "./survey";

const db = getDb();

async function done(key: string) {
  const [row] = await db.select().from(appMeta).where(eq(appMeta.key, key)).limit(1);
  return !!row;
}

async function mark(key: string, value: unknown) {
  await db.insert(appMeta).values({ key, value }).onConflictDoUpdate({ target: appMeta.key, set: { value, updatedAt: new Date() } });
}

async function seedBase() {
  if (await done("seed:base")) return console.log("[seed] demo people, sites and stations already loaded");
  const [{ n }] = (await db.select({ n: sql<number>`count(*)::int` }).from(sites)) as [{ n: number }];
  if (n > 0) return console.log("[seed] the database already has sites; demo scenario not loaded");
  await db.transaction(async (tx) => {
    const ids = new Map<string, string>();
    for (const a of accounts) {
      const [u] = await tx
        .insert(users)
        .values({ email: a.email, name: a.name, role: a.role as never, passwordHash: await hashPassword(a.password), emailVerified: new Date() })
        .returning({ id: users.id });
      ids.set(a.email, u!.id);
    }
    const siteIds = new Map<string, string>();
    for (const s of SCENARIO_SITES) {
      const [row] = await tx
        .insert(sites)
        .values({
          slug: s.slug,
          name: s.name,
          description: s.description,
          boundary: sitePolygon(s),
          timeZone: s.timeZone,
          targetMag: s.targetMag,
          isPublic: s.isPublic,
          lightingZone: s.lightingZone,
        })
        .returning({ id: sites.id });
      siteIds.set(s.slug, row!.id);
      for (const e of s.stewards) await tx.insert(siteStewards).values({ siteId: row!.id, userId: ids.get(e)! });
    }
    for (const st of SCENARIO_STATIONS) {
      const site = st.site ? SCENARIO_SITES.find((s) => s.slug === st.site)! : null;
      await tx.insert(stations).values({
        slug: st.slug,
        name: st.name,
        siteId: site ? siteIds.get(site.slug)! : null,
        ownerId: ids.get(st.owner)!,
        lat: st.lat,
        lon: st.lon,
        elevationM: st.elevationM,
        timeZone: site?.timeZone ?? "America/Phoenix",
        approval: site ? "approved" : "none",
        deviceDescription: st.device,
        fieldOfViewDeg: 20,
      });
    }
  });
  await mark("seed:base", { at: new Date().toISOString() });
  console.log(`[seed] loaded ${accounts.length} people, ${SCENARIO_SITES.length} sites, ${SCENARIO_STATIONS.length} stations`);
}

async function main() {
  const started = Date.now();
  // Every station crosses the same 400 nights: keep all their minutes of Sun and Moon positions (seed only).
  process.env.SKY_CACHE_MAX_KNOTS ??= "600000";
  await seedBase();
  await seedReadings({ db, profile: process.env.SEED_PROFILE === "test" ? "test" : "demo", done, mark });
  await seedSurveyExample({ db, done, mark });
  await seedUploadExample({ db });
  console.log(`[seed] done in ${((Date.now() - started) / 1000).toFixed(1)} s`);
  await pool().end();
}

main().catch(async (err) => {
  console.error("[seed] failed:", err);
  await pool().end().catch(() => {});
  process.exit(1);
});
