import { and, asc, eq, ilike, or, sql, type SQL } from "drizzle-orm";
import type { z } from "zod";
import { siteStewards, sites, stations, users } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import { requireRole, type Ctx } from "@/lib/auth/guard";
import { badRequest, notFound } from "@/lib/errors";
import { setRoleSchema, setStatusSchema, userSearchSchema } from "./schemas";

export const USERS_PAGE_SIZE = 25;

const likeEscape = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

/** Admins search people by name or e-mail, and filter by role and status. */
export async function listUsers({ ctx, input }: { ctx: Ctx; input: z.input<typeof userSearchSchema> }) {
  requireRole(ctx, "admin");
  const q = userSearchSchema.parse(input);
  const where: SQL[] = [];
  if (q.q) {
    const pattern = `%${likeEscape(q.q)}%`;
    where.push(or(ilike(users.email, pattern), ilike(users.name, pattern))!);
  }
  if (q.role) where.push(eq(users.role, q.role));
  if (q.status) where.push(eq(users.status, q.status));
  const cond = where.length ? and(...where) : undefined;
  const [{ total }] = (await ctx.db.select({ total: sql<number>`count(*)::int` }).from(users).where(cond)) as [{ total: number }];
  const rows = await ctx.db
    .select({
      id: users.id,
      name: users.name,
      email: users.email,
      role: users.role,
      status: users.status,
      createdAt: users.createdAt,
      stations: sql<number>`(select count(*)::int from ${stations} where ${stations.ownerId} = ${users.id})`,
      sites: sql<string[]>`coalesce((select array_agg(${sites.name} order by ${sites.name}) from ${siteStewards} join ${sites} on ${sites.id} = ${siteStewards.siteId} where ${siteStewards.userId} = ${users.id}), '{}')`,
    })
    .from(users)
    .where(cond)
    .orderBy(asc(users.email))
    .limit(USERS_PAGE_SIZE)
    .offset((q.page - 1) * USERS_PAGE_SIZE);
  return { rows, total, page: q.page, pageSize: USERS_PAGE_SIZE, query: q };
}

async function loadTarget(ctx: Ctx, userId: string) {
  const [u] = await ctx.db.select().from(users).where(eq(users.id, userId)).limit(1);
  if (!u) throw notFound("The person");
  return u;
}

export async function setUserRole({ ctx, input }: { ctx: Ctx; input: z.input<typeof setRoleSchema> }) {
  const admin = requireRole(ctx, "admin");
  const data = setRoleSchema.parse(input);
  // An admin demoting themselves could leave the network with no admin at all.
  if (data.userId === admin.id) throw badRequest("You cannot change your own role; ask another admin.");
  const target = await loadTarget(ctx, data.userId);
  if (target.role === data.role) return { id: target.id, role: target.role, changed: false };
  await ctx.db.transaction(async (tx) => {
    await tx.update(users).set({ role: data.role }).where(eq(users.id, target.id));
    await recordAudit(tx, {
      actorId: admin.id,
      action: "user.role_change",
      entityType: "user",
      entityId: target.id,
      before: { role: target.role },
      after: { role: data.role },
    });
  });
  return { id: target.id, role: data.role, changed: true };
}

/** Suspension takes effect at once: sign-in is refused and every session is ended (sessionEpoch). */
export async function setUserStatus({ ctx, input }: { ctx: Ctx; input: z.input<typeof setStatusSchema> }) {
  const admin = requireRole(ctx, "admin");
  const data = setStatusSchema.parse(input);
  if (data.userId === admin.id) throw badRequest("You cannot suspend your own account.");
  const target = await loadTarget(ctx, data.userId);
  if (target.status === data.status) return { id: target.id, status: target.status, changed: false };
  await ctx.db.transaction(async (tx) => {
    await tx
      .update(users)
      .set(data.status === "suspended" ? { status: "suspended", sessionEpoch: sql`${users.sessionEpoch} + 1` } : { status: "active" })
      .where(eq(users.id, target.id));
    await recordAudit(tx, {
      actorId: admin.id,
      action: data.status === "suspended" ? "user.suspend" : "user.unsuspend",
      entityType: "user",
      entityId: target.id,
      before: { status: target.status },
      after: { status: data.status },
    });
  });
  return { id: target.id, status: data.status, changed: true };
}
