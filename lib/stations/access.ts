/**
 * Who may read a station's data (its nights, readings, calibrations). The one place this rule lives;
 * it agrees with stationVisibleSql in lib/sites/access.ts:
 * - admins: every station;
 * - the station's owner;
 * - stewards of the station's site;
 * - anyone signed in: approved stations of public sites (a station waiting for a steward's approval
 *   does not count toward the site yet, so it is not shown to the public side of it either);
 * - the station's own token (Authorization: Bearer), for its own station only.
 * Everyone else gets 404 (notFound), so a station's existence is not revealed. A signed-out caller
 * without a token gets 401, which says only "authenticate", nothing about the station.
 */
import { eq } from "drizzle-orm";
import { sites, stations, users } from "@/db/schema";
import { isSiteSteward, requireUser, type Ctx } from "@/lib/auth/guard";
import { notFound } from "@/lib/errors";
import { authenticateToken, canManageStation } from "./tokens";

export type StationForAccess = {
  ownerId: string;
  siteId: string | null;
  approval: "none" | "pending" | "approved" | "declined";
  site?: { isPublic: boolean } | null;
};

/** Whether the signed-in caller may read this station's data (see the rule above). */
export async function canViewStation(ctx: Ctx, station: StationForAccess): Promise<boolean> {
  const user = ctx.user;
  if (!user) return false;
  if (user.role === "admin" || station.ownerId === user.id) return true;
  if (!station.siteId) return false;
  if (station.site?.isPublic && station.approval === "approved") return true;
  return isSiteSteward(ctx, station.siteId);
}

/** A station with its site's name, visibility and screening thresholds, and its owner's name and e-mail. */
export async function loadStation(ctx: Pick<Ctx, "db">, slug: string) {
  const [row] = await ctx.db
    .select({
      station: stations,
      site: {
        id: sites.id,
        slug: sites.slug,
        name: sites.name,
        isPublic: sites.isPublic,
        sunMaxAltDeg: sites.sunMaxAltDeg,
        moonMaxAltDeg: sites.moonMaxAltDeg,
        cloudWindowMin: sites.cloudWindowMin,
        cloudSpreadMag: sites.cloudSpreadMag,
      },
      owner: { id: users.id, name: users.name, email: users.email },
    })
    .from(stations)
    .leftJoin(sites, eq(sites.id, stations.siteId))
    .innerJoin(users, eq(users.id, stations.ownerId))
    .where(eq(stations.slug, slug))
    .limit(1);
  return row ?? null;
}

export type LoadedStation = NonNullable<Awaited<ReturnType<typeof loadStation>>>;

/** The screening thresholds in force for a station (its site's, else the defaults). */
export function stationThresholds(s: LoadedStation) {
  return {
    sunMaxAltDeg: s.site?.sunMaxAltDeg ?? -18,
    moonMaxAltDeg: s.site?.moonMaxAltDeg ?? 0,
    cloudWindowMin: s.site?.cloudWindowMin ?? 15,
    cloudSpreadMag: s.site?.cloudSpreadMag ?? 0.25,
  };
}

export type StationViewer = {
  loaded: LoadedStation;
  /** Owner, site steward or admin: may add calibrations and manage tokens. */
  canManage: boolean;
  /** Admins and stewards of the station's site see the owner's e-mail. */
  seesOwnerEmail: boolean;
  via: "session" | "token";
};

/** For pages and signed-in callers: the station, or 404 when the caller may not see it. */
export async function findStationForViewer({ ctx, input }: { ctx: Ctx; input: { slug: string } }): Promise<StationViewer> {
  requireUser(ctx);
  const loaded = await loadStation(ctx, input.slug);
  if (!loaded) throw notFound("The station");
  const st = { ...loaded.station, site: loaded.site };
  if (!(await canViewStation(ctx, st))) throw notFound("The station");
  const canManage = await canManageStation(ctx, loaded.station);
  const seesOwnerEmail = ctx.user!.role === "admin" || (loaded.station.siteId ? await isSiteSteward(ctx, loaded.station.siteId) : false);
  return { loaded, canManage, seesOwnerEmail, via: "session" };
}

/**
 * For route handlers: a station token in `Authorization` (its own station only), else the session.
 * A token for another station answers 404, as for anyone who may not see the station.
 */
export async function findStationForReader({ ctx, input }: { ctx: Ctx; input: { slug: string; authorization: string | null } }): Promise<StationViewer> {
  if (input.authorization && /^Bearer\s/i.test(input.authorization)) {
    const principal = await authenticateToken(ctx.db, input.authorization);
    if (principal.station.slug !== input.slug) throw notFound("The station");
    const loaded = await loadStation(ctx, input.slug);
    if (!loaded) throw notFound("The station");
    return { loaded, canManage: false, seesOwnerEmail: false, via: "token" };
  }
  return findStationForViewer({ ctx, input: { slug: input.slug } });
}
