/**
 * Saved glow estimates (the /glow page): the sites to estimate for, save, list, delete. Advocates,
 * stewards and admins; an estimate belongs to its maker (admins see all). Results are recomputed here
 * on save (never taken from the browser), with lib/glow-estimates/plan.ts.
 */
import { and, desc, eq, sql } from "drizzle-orm";
import type { MultiPolygon, Polygon } from "geojson";
import { z } from "zod";
import { glowEstimates } from "@/db/schema";
import type { Ctx } from "@/lib/auth/guard";
import { requireRole } from "@/lib/auth/guard";
import { notFound } from "@/lib/errors";
import { siteVisibleSql } from "@/lib/sites/access";
import { darknessNow } from "@/lib/sites/darkness";
import { loadSiteNights } from "@/lib/trends/site-trend";
import { planGlow, type GlowSite } from "./plan";

export const GLOW_ROLES = ["advocate", "steward"] as const;

const lat = z.coerce.number().min(-90, "Latitude must be −90 to 90").max(90, "Latitude must be −90 to 90");
const lon = z.coerce.number().min(-180, "Longitude must be −180 to 180").max(180, "Longitude must be −180 to 180");
const population = z.coerce.number().positive("Population must be more than 0").max(50_000_000, "Population must be at most 50 million");

export const glowSourceSchema = z.union([
  z.object({ name: z.string().trim().min(1, "Name the source").max(120), population, lat, lon }),
  z.object({ name: z.string().trim().min(1, "Name the source").max(120), population, siteSlug: z.string().regex(/^[a-z0-9-]{1,80}$/), distanceKm: z.coerce.number().positive("Distance must be more than 0 km").max(500, "Distance must be at most 500 km") }),
]);

export const saveGlowSchema = z
  .object({
    name: z.string().trim().min(2, "Give the estimate a name").max(160),
    lat,
    lon,
    population: z.coerce.number().positive("Population must be more than 0").max(50_000_000).optional(),
    lumens: z.coerce.number().positive("Lumens must be more than 0").max(1e11).optional(),
    sources: z.array(glowSourceSchema).max(50).default([]),
  })
  .refine((v) => (v.population === undefined) !== (v.lumens === undefined), { path: ["population"], message: "Give the added population or the installed lumens (one of the two)" });
export type SaveGlowInput = z.input<typeof saveGlowSchema>;

export type GlowSiteChoice = GlowSite & { boundary: Polygon | MultiPolygon };

/** Visible sites with their centre and measured darkness now (the site page's number). */
export async function glowSites({ ctx }: { ctx: Ctx }): Promise<GlowSiteChoice[]> {
  const user = requireRole(ctx, ...GLOW_ROLES);
  const rows = await ctx.db.execute<{ id: string; slug: string; name: string; boundary: Polygon | MultiPolygon; natural_sky_mag: number; lat: number | null; lon: number | null }>(sql`
    SELECT si.id, si.slug, si.name, si.boundary, si.natural_sky_mag,
           (SELECT avg(st.lat) FROM stations st WHERE st.site_id = si.id AND st.approval = 'approved') AS lat,
           (SELECT avg(st.lon) FROM stations st WHERE st.site_id = si.id AND st.approval = 'approved') AS lon
      FROM sites si WHERE ${siteVisibleSql(user)} ORDER BY si.name`);
  const out: GlowSiteChoice[] = [];
  for (const r of rows.rows) {
    let centre = r.lat !== null && r.lon !== null ? { lat: Number(r.lat), lon: Number(r.lon) } : null;
    if (!centre) {
      const ring = r.boundary.type === "Polygon" ? r.boundary.coordinates[0]! : r.boundary.coordinates[0]![0]!;
      const pts = ring.slice(0, -1);
      centre = { lon: pts.reduce((a, p) => a + p[0]!, 0) / pts.length, lat: pts.reduce((a, p) => a + p[1]!, 0) / pts.length };
    }
    const dn = darknessNow(await loadSiteNights(ctx.db, r.id));
    out.push({ slug: r.slug, name: r.name, boundary: r.boundary, centre, measuredMag: dn?.medianMag ?? null, measuredNights: dn?.nights ?? 0, naturalSkyMag: Number(r.natural_sky_mag) });
  }
  return out;
}

export async function saveGlowEstimate({ ctx, input }: { ctx: Ctx; input: SaveGlowInput }) {
  const user = requireRole(ctx, ...GLOW_ROLES);
  const v = saveGlowSchema.parse(input);
  const sites = await glowSites({ ctx });
  const proposed = { lat: v.lat, lon: v.lon, ...(v.population !== undefined ? { population: v.population } : { lumens: v.lumens! }) };
  const sources = v.sources.map((s) => ({ ...s }));
  const results = planGlow({ proposed, sources, sites });
  const [row] = await ctx.db.insert(glowEstimates).values({ createdBy: user.id, name: v.name, proposed, existingSources: sources, results }).returning({ id: glowEstimates.id });
  return { id: row!.id, results };
}

export async function listMyGlowEstimates({ ctx }: { ctx: Ctx }) {
  const user = requireRole(ctx, ...GLOW_ROLES);
  const rows = await ctx.db.select().from(glowEstimates).where(eq(glowEstimates.createdBy, user.id)).orderBy(desc(glowEstimates.createdAt)).limit(100);
  return rows.map((r) => ({ id: r.id, name: r.name, proposed: r.proposed, existingSources: r.existingSources, results: r.results, createdAt: r.createdAt.toISOString() }));
}

export async function deleteGlowEstimate({ ctx, input }: { ctx: Ctx; input: { id: string } }) {
  const user = requireRole(ctx, ...GLOW_ROLES);
  const id = z.string().uuid("Not an estimate id").parse(input.id);
  const where = user.role === "admin" ? eq(glowEstimates.id, id) : and(eq(glowEstimates.id, id), eq(glowEstimates.createdBy, user.id));
  const gone = await ctx.db.delete(glowEstimates).where(where).returning({ id: glowEstimates.id });
  if (!gone.length) throw notFound("The glow estimate");
  return { deleted: true };
}
