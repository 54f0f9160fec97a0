/**
 * Who may see which sites and stations (the one place these rules live):
 * - admins: everything;
 * - signed-in people: public sites, sites they steward; stations that are approved in a public site,
 *   every station of a site they steward, and their own stations;
 * - signed-out visitors: public sites only, through the public routes, with personal data removed
 *   (no owner names or e-mails; station positions rounded to ~1 km when the site asks for it).
 * Anything a caller may not see answers 404, never 403.
 */
import { eq } from "drizzle-orm";
import { sql, type SQL } from "drizzle-orm";
import { sites } from "@/db/schema";
import type { Ctx, CurrentUser } from "@/lib/auth/guard";
import { isSiteSteward } from "@/lib/auth/guard";
import { notFound } from "@/lib/errors";

/** Predicate on a sites row aliased `si`. */
export function siteVisibleSql(user: CurrentUser | null): SQL {
  if (!user) return sql`si.is_public`;
  if (user.role === "admin") return sql`TRUE`;
  return sql`(si.is_public OR EXISTS (SELECT 1 FROM site_stewards ss WHERE ss.site_id = si.id AND ss.user_id = ${user.id}::uuid))`;
}

/** Predicate on a stations row aliased `st` (with its site, if any, left-joined as `si`). */
export function stationVisibleSql(user: CurrentUser | null): SQL {
  if (!user) return sql`(si.is_public AND st.approval = 'approved')`;
  if (user.role === "admin") return sql`TRUE`;
  return sql`(
    st.owner_id = ${user.id}::uuid
    OR (si.is_public AND st.approval = 'approved')
    OR EXISTS (SELECT 1 FROM site_stewards ss WHERE ss.site_id = st.site_id AND ss.user_id = ${user.id}::uuid)
  )`;
}

export type SiteRow = typeof sites.$inferSelect;

/**
 * How a caller sees a site: `full` (signed in and allowed), `public` (the public page or a signed-out
 * caller: personal data removed). Throws notFound for a site the caller may not see.
 */
export type SiteAccess = { site: SiteRow; mode: "full" | "public"; canEdit: boolean };

export async function findSiteForViewer({ ctx, input }: { ctx: Ctx; input: { slug: string; publicView?: boolean } }): Promise<SiteAccess> {
  const [site] = await ctx.db.select().from(sites).where(eq(sites.slug, input.slug)).limit(1);
  if (!site) throw notFound("The site");
  if (input.publicView || !ctx.user) {
    if (!site.isPublic) throw notFound("The site");
    return { site, mode: "public", canEdit: false };
  }
  const canEdit = await isSiteSteward(ctx, site.id);
  if (!site.isPublic && !canEdit) throw notFound("The site");
  return { site, mode: "full", canEdit };
}

/** About 1 km: two decimals of a degree of latitude (1.1 km) and of longitude (≤ 1.1 km). */
export function roundPosition(lat: number, lon: number): { lat: number; lon: number } {
  return { lat: Math.round(lat * 100) / 100, lon: Math.round(lon * 100) / 100 };
}
