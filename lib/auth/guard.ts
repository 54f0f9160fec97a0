import { and, eq } from "drizzle-orm";
import { getServerSession } from "next-auth";
import { forbidden as pageForbidden, redirect } from "next/navigation";
import { getDb, type Db } from "@/db";
import { siteStewards, users, type Role } from "@/db/schema";
import { forbidden, unauthorized } from "@/lib/errors";
import { authOptions } from "./options";

export type CurrentUser = { id: string; email: string; name: string | null; role: Role };

/** What every lib/ verb receives: who is asking, and the database. */
export type Ctx = { user: CurrentUser | null; db: Db };

/**
 * The signed-in user, read fresh from the database on every request so that a role change,
 * a suspension or "sign out everywhere" takes effect at once.
 */
export async function currentUser(): Promise<CurrentUser | null> {
  const session = await getServerSession(authOptions());
  const s = session?.user as { id?: string; epoch?: number } | undefined;
  if (!s?.id) return null;
  const [u] = await getDb()
    .select({ id: users.id, email: users.email, name: users.name, role: users.role, status: users.status, epoch: users.sessionEpoch })
    .from(users)
    .where(eq(users.id, s.id))
    .limit(1);
  if (!u || u.status !== "active") return null;
  if (typeof s.epoch === "number" && s.epoch !== u.epoch) return null;
  return { id: u.id, email: u.email, name: u.name, role: u.role };
}

export async function context(): Promise<Ctx> {
  return { user: await currentUser(), db: getDb() };
}

/** For route handlers and server actions: throws typed errors (401/403). */
export function requireUser(ctx: Ctx): CurrentUser {
  if (!ctx.user) throw unauthorized("Sign in to do this.");
  return ctx.user;
}

export function requireRole(ctx: Ctx, ...roles: Role[]): CurrentUser {
  const user = requireUser(ctx);
  if (user.role !== "admin" && !roles.includes(user.role)) throw forbidden();
  return user;
}

export async function isSiteSteward(ctx: Ctx, siteId: string): Promise<boolean> {
  const user = ctx.user;
  if (!user) return false;
  if (user.role === "admin") return true;
  if (user.role !== "steward") return false;
  const rows = await ctx.db
    .select({ siteId: siteStewards.siteId })
    .from(siteStewards)
    .where(and(eq(siteStewards.siteId, siteId), eq(siteStewards.userId, user.id)))
    .limit(1);
  return rows.length > 0;
}

export async function requireSiteSteward(ctx: Ctx, siteId: string): Promise<CurrentUser> {
  const user = requireUser(ctx);
  if (!(await isSiteSteward(ctx, siteId))) throw forbidden("Only this site's stewards (or an admin) may do that.");
  return user;
}

/** For pages: signed-out visitors go to sign-in; a wrong role gets the 403 page. */
export async function pageContext(roles?: Role[], next?: string): Promise<Ctx & { user: CurrentUser }> {
  const ctx = await context();
  if (!ctx.user) redirect(`/signin${next ? `?callbackUrl=${encodeURIComponent(next)}` : ""}`);
  if (roles && ctx.user.role !== "admin" && !roles.includes(ctx.user.role)) pageForbidden();
  return ctx as Ctx & { user: CurrentUser };
}
