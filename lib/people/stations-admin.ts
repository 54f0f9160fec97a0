import { and, asc, eq, ilike, or, sql, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import type { z } from "zod";
import { sites, stations, users } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import { requireRole, type Ctx } from "@/lib/auth/guard";
import { badRequest, conflict, notFound } from "@/lib/errors";
import { stationIdSchema, stationSearchSchema, transferSchema } from "./schemas";

export const STATIONS_PAGE_SIZE = 25;

export async function listStationsForAdmin({ ctx, input }: { ctx: Ctx; input: z.input<typeof stationSearchSchema> }) {
  requireRole(ctx, "admin");
  const q = stationSearchSchema.parse(input);
  const owner = alias(users, "owner");
  const where: SQL[] = [];
  if (q.q) {
    const p = `%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    where.push(or(ilike(stations.name, p), ilike(stations.slug, p), ilike(owner.email, p), ilike(sites.name, p))!);
  }
  if (q.status) where.push(eq(stations.status, q.status));
  const cond = where.length ? and(...where) : undefined;
  const base = ctx.db
    .select({
      id: stations.id,
      slug: stations.slug,
      name: stations.name,
      status: stations.status,
      approval: stations.approval,
      siteName: sites.name,
      ownerId: stations.ownerId,
      ownerName: owner.name,
      ownerEmail: owner.email,
      createdAt: stations.createdAt,
      total: sql<number>`count(*) over ()::int`,
    })
    .from(stations)
    .innerJoin(owner, eq(owner.id, stations.ownerId))
    .leftJoin(sites, eq(sites.id, stations.siteId))
    .where(cond)
    .orderBy(asc(stations.name))
    .limit(STATIONS_PAGE_SIZE)
    .offset((q.page - 1) * STATIONS_PAGE_SIZE);
  const rows = await base;
  return { rows, total: rows[0]?.total ?? 0, page: q.page, pageSize: STATIONS_PAGE_SIZE, query: q };
}

async function loadStation(ctx: Ctx, stationId: string) {
  const [s] = await ctx.db.select().from(stations).where(eq(stations.id, stationId)).limit(1);
  if (!s) throw notFound("The station");
  return s;
}

/** A retired station keeps its readings and history; it stops being listed as active. */
export async function retireStation({ ctx, input }: { ctx: Ctx; input: z.input<typeof stationIdSchema> }) {
  const admin = requireRole(ctx, "admin");
  const { stationId } = stationIdSchema.parse(input);
  const s = await loadStation(ctx, stationId);
  if (s.status === "retired") throw conflict("This station is already retired.");
  const retiredAt = new Date();
  await ctx.db.transaction(async (tx) => {
    await tx.update(stations).set({ status: "retired", retiredAt }).where(eq(stations.id, s.id));
    await recordAudit(tx, {
      actorId: admin.id,
      action: "station.retire",
      entityType: "station",
      entityId: s.id,
      before: { status: s.status, retiredAt: null },
      after: { status: "retired", retiredAt: retiredAt.toISOString() },
    });
  });
  return { id: s.id, status: "retired" as const };
}

export async function transferStation({ ctx, input }: { ctx: Ctx; input: z.input<typeof transferSchema> }) {
  const admin = requireRole(ctx, "admin");
  const data = transferSchema.parse(input);
  const s = await loadStation(ctx, data.stationId);
  const [to] = await ctx.db.select({ id: users.id, status: users.status }).from(users).where(eq(users.email, data.newOwnerEmail)).limit(1);
  if (!to) throw notFound("A person with that e-mail address");
  if (to.status !== "active") throw badRequest("That account is suspended.", { field: "newOwnerEmail" });
  if (to.id === s.ownerId) throw badRequest("That person already owns this station.", { field: "newOwnerEmail" });
  await ctx.db.transaction(async (tx) => {
    await tx.update(stations).set({ ownerId: to.id }).where(eq(stations.id, s.id));
    await recordAudit(tx, {
      actorId: admin.id,
      action: "station.transfer",
      entityType: "station",
      entityId: s.id,
      before: { ownerId: s.ownerId },
      after: { ownerId: to.id },
    });
  });
  return { id: s.id, ownerId: to.id };
}
