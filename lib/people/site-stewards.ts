import { and, asc, eq } from "drizzle-orm";
import type { z } from "zod";
import { siteStewards, sites, users } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import { requireRole, type Ctx } from "@/lib/auth/guard";
import { badRequest, notFound } from "@/lib/errors";
import { removeStewardSchema, stewardSchema } from "./schemas";

/** Every site with its stewards, for the admin sites page. */
export async function listSitesWithStewards({ ctx }: { ctx: Ctx }) {
  requireRole(ctx, "admin");
  const rows = await ctx.db.select({ id: sites.id, slug: sites.slug, name: sites.name, isPublic: sites.isPublic }).from(sites).orderBy(asc(sites.name));
  const links = await ctx.db
    .select({ siteId: siteStewards.siteId, userId: users.id, name: users.name, email: users.email, role: users.role, status: users.status })
    .from(siteStewards)
    .innerJoin(users, eq(users.id, siteStewards.userId))
    .orderBy(asc(users.email));
  return rows.map((s) => ({ ...s, stewards: links.filter((l) => l.siteId === s.id) }));
}

async function stewardIds(ctx: Ctx, siteId: string) {
  const rows = await ctx.db.select({ userId: siteStewards.userId }).from(siteStewards).where(eq(siteStewards.siteId, siteId));
  return rows.map((r) => r.userId).sort();
}

async function requireSite(ctx: Ctx, siteId: string) {
  const [site] = await ctx.db.select({ id: sites.id, name: sites.name }).from(sites).where(eq(sites.id, siteId)).limit(1);
  if (!site) throw notFound("The site");
  return site;
}

/** Only people with the steward role (or admins) can keep a site: the role is what grants the powers. */
export async function addSiteSteward({ ctx, input }: { ctx: Ctx; input: z.input<typeof stewardSchema> }) {
  const admin = requireRole(ctx, "admin");
  const data = stewardSchema.parse(input);
  const site = await requireSite(ctx, data.siteId);
  const [person] = await ctx.db.select({ id: users.id, role: users.role, name: users.name }).from(users).where(eq(users.email, data.email)).limit(1);
  if (!person) throw notFound("A person with that e-mail address");
  if (person.role !== "steward" && person.role !== "admin")
    throw badRequest(`${person.name ?? data.email} is a ${person.role}. Give them the steward role first (People).`, { field: "email" });
  const before = await stewardIds(ctx, site.id);
  if (before.includes(person.id)) return { siteId: site.id, stewardIds: before, changed: false };
  await ctx.db.transaction(async (tx) => {
    await tx.insert(siteStewards).values({ siteId: site.id, userId: person.id }).onConflictDoNothing();
    await recordAudit(tx, {
      actorId: admin.id,
      action: "site.steward_add",
      entityType: "site",
      entityId: site.id,
      before: { stewardIds: before },
      after: { stewardIds: [...before, person.id].sort() },
    });
  });
  return { siteId: site.id, stewardIds: [...before, person.id].sort(), changed: true };
}

export async function removeSiteSteward({ ctx, input }: { ctx: Ctx; input: z.input<typeof removeStewardSchema> }) {
  const admin = requireRole(ctx, "admin");
  const data = removeStewardSchema.parse(input);
  const site = await requireSite(ctx, data.siteId);
  const before = await stewardIds(ctx, site.id);
  if (!before.includes(data.userId)) return { siteId: site.id, stewardIds: before, changed: false };
  const after = before.filter((id) => id !== data.userId);
  await ctx.db.transaction(async (tx) => {
    await tx.delete(siteStewards).where(and(eq(siteStewards.siteId, site.id), eq(siteStewards.userId, data.userId)));
    await recordAudit(tx, {
      actorId: admin.id,
      action: "site.steward_remove",
      entityType: "site",
      entityId: site.id,
      before: { stewardIds: before },
      after: { stewardIds: after },
    });
  });
  return { siteId: site.id, stewardIds: after, changed: true };
}
