import { randomBytes } from "node:crypto";
import { and, asc, eq, inArray } from "drizzle-orm";
import type { MultiPolygon, Polygon } from "geojson";
import { z } from "zod";
import type { Db } from "@/db";
import { siteStewards, sites, stations, users } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import { isSiteSteward, requireRole, type Ctx } from "@/lib/auth/guard";
import { conflict, notFound } from "@/lib/errors";
import { pointInPolygon } from "@/lib/geo/point-in-polygon";
import { isValidTimeZone, timeZoneAt } from "@/lib/geo/time-zone";
import { appLink } from "@/lib/people/links";
import { sendStationDecisionMail, sendStationPendingMail } from "@/lib/people/mail";

const optionalNumber = (schema: z.ZodNumber) =>
  z.preprocess((v) => (v === "" || v === null || v === undefined ? undefined : v), z.coerce.number().pipe(schema).optional());

export const registerStationSchema = z.object({
  name: z.string().trim().min(2, "Give the station a name (2 characters or more).").max(80, "At most 80 characters."),
  lat: z.coerce.number({ message: "Enter a latitude." }).min(-90, "Latitude is between −90 and 90.").max(90, "Latitude is between −90 and 90."),
  lon: z.coerce.number({ message: "Enter a longitude." }).min(-180, "Longitude is between −180 and 180.").max(180, "Longitude is between −180 and 180."),
  elevationM: optionalNumber(z.number().min(-500, "Elevation looks wrong.").max(9000, "Elevation looks wrong.")),
  deviceDescription: z.string().trim().max(500, "At most 500 characters.").default(""),
  fieldOfViewDeg: optionalNumber(z.number().gt(0, "Field of view is more than 0°.").max(180, "Field of view is at most 180°.")),
  timeZone: z
    .string()
    .trim()
    .max(64)
    .default("")
    .refine((tz) => tz === "" || isValidTimeZone(tz), "Not a known IANA time zone (e.g. America/Denver)."),
});
export type RegisterStationInput = z.input<typeof registerStationSchema>;

type SiteHit = { id: string; slug: string; name: string };

/** The site whose boundary contains the position (the first by name if boundaries overlap). */
export async function findSiteAt(db: Pick<Db, "select">, lat: number, lon: number): Promise<SiteHit | null> {
  const all = await db.select({ id: sites.id, slug: sites.slug, name: sites.name, boundary: sites.boundary }).from(sites).orderBy(asc(sites.name));
  const hit = all.find((s) => pointInPolygon(lon, lat, s.boundary as Polygon | MultiPolygon));
  return hit ? { id: hit.id, slug: hit.slug, name: hit.name } : null;
}

function slugify(name: string): string {
  const base = name
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 40);
  return `${base || "station"}-${randomBytes(3).toString("hex")}`;
}

/**
 * A volunteer (or steward) registers a station. Inside a site's boundary it is attached to the
 * site and waits for a steward's approval — unless the registrant is that site's steward. Readings
 * are accepted either way; approval only decides whether they count toward the site.
 */
export async function registerStation({ ctx, input }: { ctx: Ctx; input: RegisterStationInput }) {
  const me = requireRole(ctx, "volunteer", "steward");
  const data = registerStationSchema.parse(input);
  const timeZone = data.timeZone || timeZoneAt(data.lat, data.lon) || "UTC";
  const site = await findSiteAt(ctx.db, data.lat, data.lon);
  const approval = !site ? ("none" as const) : (await isSiteSteward(ctx, site.id)) ? ("approved" as const) : ("pending" as const);
  const station = await ctx.db.transaction(async (tx) => {
    const [row] = await tx
      .insert(stations)
      .values({
        slug: slugify(data.name),
        name: data.name,
        ownerId: me.id,
        siteId: site?.id ?? null,
        approval,
        lat: data.lat,
        lon: data.lon,
        elevationM: data.elevationM ?? null,
        timeZone,
        deviceDescription: data.deviceDescription,
        fieldOfViewDeg: data.fieldOfViewDeg ?? null,
      })
      .returning();
    await recordAudit(tx, {
      actorId: me.id,
      action: "station.create",
      entityType: "station",
      entityId: row!.id,
      before: null,
      after: { name: row!.name, siteId: row!.siteId, approval, lat: row!.lat, lon: row!.lon, timeZone, ownerId: me.id },
    });
    return row!;
  });
  if (site && approval === "pending") {
    const stewards = await stewardsOf(ctx.db, site.id);
    await sendStationPendingMail({
      to: stewards.map((s) => s.email),
      stationName: station.name,
      siteName: site.name,
      ownerName: me.name ?? "A volunteer",
      url: appLink("/approvals"),
    });
  }
  return { id: station.id, slug: station.slug, name: station.name, approval, timeZone, site };
}

async function stewardsOf(db: Pick<Db, "select">, siteId: string) {
  return db
    .select({ email: users.email })
    .from(siteStewards)
    .innerJoin(users, eq(users.id, siteStewards.userId))
    .where(and(eq(siteStewards.siteId, siteId), eq(users.status, "active"), inArray(users.role, ["steward", "admin"])));
}

/** Stations waiting for this steward's decision (admins: every site's). */
export async function listPendingStations({ ctx }: { ctx: Ctx }) {
  const me = requireRole(ctx, "steward");
  const owner = users;
  const q = ctx.db
    .select({
      id: stations.id,
      slug: stations.slug,
      name: stations.name,
      lat: stations.lat,
      lon: stations.lon,
      deviceDescription: stations.deviceDescription,
      fieldOfViewDeg: stations.fieldOfViewDeg,
      createdAt: stations.createdAt,
      siteId: sites.id,
      siteName: sites.name,
      siteSlug: sites.slug,
      ownerName: owner.name,
      // Stewards of the station's site may see its owner's address (lib/people/visibility.ts).
      ownerEmail: owner.email,
    })
    .from(stations)
    .innerJoin(sites, eq(sites.id, stations.siteId))
    .innerJoin(owner, eq(owner.id, stations.ownerId));
  const pending = eq(stations.approval, "pending");
  if (me.role === "admin") return q.where(pending).orderBy(asc(stations.createdAt));
  return q
    .innerJoin(siteStewards, and(eq(siteStewards.siteId, stations.siteId), eq(siteStewards.userId, me.id)))
    .where(pending)
    .orderBy(asc(stations.createdAt));
}

export const decideStationSchema = z.object({ stationId: z.string().uuid(), decision: z.enum(["approve", "decline"]) });

export async function decideStationApproval({ ctx, input }: { ctx: Ctx; input: z.input<typeof decideStationSchema> }) {
  const me = requireRole(ctx, "steward");
  const data = decideStationSchema.parse(input);
  const [s] = await ctx.db.select().from(stations).where(eq(stations.id, data.stationId)).limit(1);
  // A steward of another site learns nothing about the station: 404, not 403.
  if (!s || !s.siteId || !(await isSiteSteward(ctx, s.siteId))) throw notFound("The station");
  if (s.approval !== "pending") throw conflict(`This station was already ${s.approval}.`);
  const approval = data.decision === "approve" ? ("approved" as const) : ("declined" as const);
  await ctx.db.transaction(async (tx) => {
    await tx.update(stations).set({ approval }).where(eq(stations.id, s.id));
    await recordAudit(tx, {
      actorId: me.id,
      action: `station.${data.decision}`,
      entityType: "station",
      entityId: s.id,
      before: { approval: s.approval, siteId: s.siteId },
      after: { approval, siteId: s.siteId },
    });
  });
  const [owner] = await ctx.db.select({ email: users.email }).from(users).where(eq(users.id, s.ownerId)).limit(1);
  const [site] = await ctx.db.select({ name: sites.name }).from(sites).where(eq(sites.id, s.siteId)).limit(1);
  if (owner && site) await sendStationDecisionMail({ to: owner.email, stationName: s.name, siteName: site.name, approved: approval === "approved" });
  return { id: s.id, approval };
}

/** Site boundaries for the position picker (all sites: a volunteer needs to see where approval applies). */
export async function siteBoundaries({ ctx }: { ctx: Ctx }) {
  requireRole(ctx, "volunteer", "steward");
  return ctx.db.select({ id: sites.id, name: sites.name, boundary: sites.boundary }).from(sites).orderBy(asc(sites.name));
}
