/**
 * The weekly digest (Monday 08:00 UTC): for each person who opted in, each site they steward with
 * its last 7 nights against the target. One outbox row per person per week (dedupe key
 * digest:<monday>:<user>), so a re-run of the job never mails twice.
 */
import { and, asc, eq, inArray, sql } from "drizzle-orm";
import { getDb, type Db } from "@/db";
import { alerts, notificationSettings, siteStewards, sites, users } from "@/db/schema";
import { env } from "@/lib/env";
import { loadSiteNights } from "@/lib/trends/site-trend";
import { buildDigestMail, type DigestSite } from "./email";
import { addToOutbox, enqueueOutbox } from "./outbox";

/** The Monday (UTC) of the week containing `now`, YYYY-MM-DD. */
export function weekOf(now: Date): string {
  const d = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate()));
  d.setUTCDate(d.getUTCDate() - ((d.getUTCDay() + 6) % 7));
  return d.toISOString().slice(0, 10);
}

export async function runWeeklyDigest(
  opts: { db?: Db; now?: Date; enqueue?: boolean } = {},
): Promise<string[]> {
  const db = opts.db ?? getDb();
  const week = weekOf(opts.now ?? new Date());
  const people = await db
    .select({ id: users.id, email: users.email, token: notificationSettings.unsubscribeToken })
    .from(notificationSettings)
    .innerJoin(users, eq(users.id, notificationSettings.userId))
    .where(and(eq(notificationSettings.weeklyDigest, true), eq(users.status, "active")));
  const ids: string[] = [];
  for (const p of people) {
    const mine = await db
      .select({ id: sites.id, name: sites.name, slug: sites.slug, targetMag: sites.targetMag })
      .from(siteStewards)
      .innerJoin(sites, eq(sites.id, siteStewards.siteId))
      .where(eq(siteStewards.userId, p.id))
      .orderBy(asc(sites.name));
    if (mine.length === 0) continue;
    const digestSites: DigestSite[] = [];
    for (const s of mine) {
      const nights = (await loadSiteNights(db, s.id, { from: shift(week, -7) })).filter(
        (n) => n.night < week,
      );
      const [{ n }] = (await db
        .select({ n: sql<number>`count(*)::int` })
        .from(alerts)
        .where(and(eq(alerts.siteId, s.id), inArray(alerts.status, ["open", "acknowledged"])))) as [
        { n: number },
      ];
      digestSites.push({
        name: s.name,
        slug: s.slug,
        targetMag: s.targetMag,
        nights: nights.slice(-7).reverse(),
        openAlerts: n,
      });
    }
    const mail = buildDigestMail({
      appUrl: env().APP_URL,
      token: p.token,
      weekOf: week,
      sites: digestSites,
    });
    const id = await addToOutbox(db, {
      dedupeKey: `digest:${week}:${p.id}`,
      userId: p.id,
      recipient: p.email,
      ...mail,
    });
    if (id) ids.push(id);
  }
  if (opts.enqueue !== false) await enqueueOutbox(ids);
  return ids;
}

function shift(night: string, days: number): string {
  const d = new Date(`${night}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + days);
  return d.toISOString().slice(0, 10);
}
