import { and, eq, sql } from "drizzle-orm";
import { siteStewards, stations } from "@/db/schema";
import type { Ctx } from "@/lib/auth/guard";

/**
 * Privacy rule for e-mail addresses: a person's address is visible to themselves, to admins, and
 * to the stewards of any site where that person has a station (approved or waiting for approval:
 * a steward may need to write to someone before approving). Nobody else sees it.
 */
export async function canSeeEmail(ctx: Pick<Ctx, "user" | "db">, userId: string): Promise<boolean> {
  const me = ctx.user;
  if (!me) return false;
  if (me.role === "admin" || me.id === userId) return true;
  if (me.role !== "steward") return false;
  const rows = await ctx.db
    .select({ one: sql<number>`1` })
    .from(stations)
    .innerJoin(siteStewards, eq(siteStewards.siteId, stations.siteId))
    .where(and(eq(stations.ownerId, userId), eq(siteStewards.userId, me.id)))
    .limit(1);
  return rows.length > 0;
}

/** The address, or null when the rule above hides it. */
export async function visibleEmail(ctx: Pick<Ctx, "user" | "db">, user: { id: string; email: string }): Promise<string | null> {
  return (await canSeeEmail(ctx, user.id)) ? user.email : null;
}
