import { and, eq, inArray, isNull, sql } from "drizzle-orm";
import type { z } from "zod";
import type { Db } from "@/db";
import { invitations, siteStewards, sites, users, type Role } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import { hashPassword } from "@/lib/auth/password";
import { requireRole, type Ctx } from "@/lib/auth/guard";
import { env } from "@/lib/env";
import { badRequest, conflict } from "@/lib/errors";
import { appLink, linkError, rowProblem, tokenShapeProblem } from "./links";
import { sendInvitationMail } from "./mail";
import { acceptInviteSchema, inviteSchema } from "./schemas";
import { hashToken, issueToken, type LinkProblem } from "./tokens";

/** Invitations work for 7 days: long enough for someone who reads mail weekly. */
export const INVITE_TTL_MS = 7 * 24 * 3600_000;

type NewInvitation = { email: string; role: Role; siteIds: string[]; invitedBy: string | null; joinRequestId?: string | null };

/** Stores a new invitation and returns its link; the caller sends the e-mail. */
export async function createInvitationRecord(db: Pick<Db, "insert">, inv: NewInvitation) {
  const { token, hash } = issueToken(env().NEXTAUTH_SECRET, "invite");
  const expiresAt = new Date(Date.now() + INVITE_TTL_MS);
  const [row] = await db
    .insert(invitations)
    .values({ ...inv, joinRequestId: inv.joinRequestId ?? null, tokenHash: hash, expiresAt })
    .returning({ id: invitations.id });
  return { id: row!.id, url: appLink(`/invite/${token}`), expiresAt };
}

/** Admins invite someone by e-mail, with a role and, for stewards, the sites they will keep. */
export async function inviteUser({ ctx, input }: { ctx: Ctx; input: z.input<typeof inviteSchema> }) {
  const admin = requireRole(ctx, "admin");
  const data = inviteSchema.parse(input);
  const siteIds = data.role === "steward" ? [...new Set(data.siteIds)] : [];
  const [existing] = await ctx.db.select({ id: users.id }).from(users).where(eq(users.email, data.email)).limit(1);
  if (existing) throw conflict("Someone already has an account with this e-mail address.", { field: "email" });
  if (siteIds.length) {
    const found = await ctx.db.select({ id: sites.id }).from(sites).where(inArray(sites.id, siteIds));
    if (found.length !== siteIds.length) throw badRequest("One of the chosen sites does not exist.", { field: "siteIds" });
  }
  const inv = await ctx.db.transaction(async (tx) => {
    // A new invitation replaces any earlier open one for the same address.
    await tx
      .update(invitations)
      .set({ revokedAt: new Date() })
      .where(and(eq(invitations.email, data.email), isNull(invitations.usedAt), isNull(invitations.revokedAt)));
    const created = await createInvitationRecord(tx, { email: data.email, role: data.role, siteIds, invitedBy: admin.id });
    await recordAudit(tx, {
      actorId: admin.id,
      action: "invitation.create",
      entityType: "invitation",
      entityId: created.id,
      after: { email: data.email, role: data.role, siteIds, expiresAt: created.expiresAt.toISOString() },
    });
    return created;
  });
  await sendInvitationMail({ to: data.email, url: inv.url, role: data.role, inviter: admin.name ?? admin.email, expiresAt: inv.expiresAt });
  return { id: inv.id, email: data.email, role: data.role, siteIds, expiresAt: inv.expiresAt };
}

export type InvitationView = { ok: true; email: string; role: Role; siteNames: string[] } | { ok: false; problem: LinkProblem };

/** For the accept page: what the link is for, or why it does not work. Reveals nothing for a bad link. */
export async function inspectInvitation(db: Db, token: string): Promise<InvitationView> {
  const shape = tokenShapeProblem("invite", token);
  if (shape) return { ok: false, problem: shape };
  const [row] = await db.select().from(invitations).where(eq(invitations.tokenHash, hashToken(token))).limit(1);
  const problem = rowProblem(row);
  if (problem || !row) return { ok: false, problem: problem ?? "invalid" };
  const siteNames = row.siteIds.length
    ? (await db.select({ name: sites.name }).from(sites).where(inArray(sites.id, row.siteIds))).map((s) => s.name)
    : [];
  return { ok: true, email: row.email, role: row.role, siteNames };
}

/** The invited person sets a name and password; the link is spent in the same transaction. */
export async function acceptInvitation({ ctx, input }: { ctx: Ctx; input: z.input<typeof acceptInviteSchema> }) {
  const data = acceptInviteSchema.parse(input);
  const shape = tokenShapeProblem("invite", data.token);
  if (shape) throw linkError(shape);
  const passwordHash = await hashPassword(data.password);
  return ctx.db.transaction(async (tx) => {
    // Row lock: two tabs submitting the same link cannot both create an account.
    const [row] = await tx.select().from(invitations).where(eq(invitations.tokenHash, hashToken(data.token))).for("update").limit(1);
    const problem = rowProblem(row);
    if (problem || !row) throw linkError(problem ?? "invalid");
    const [taken] = await tx.select({ id: users.id }).from(users).where(eq(users.email, row.email)).limit(1);
    if (taken) throw conflict("An account with this e-mail address exists already. Sign in instead.");
    const [user] = await tx
      .insert(users)
      .values({ email: row.email, name: data.name, role: row.role, passwordHash, emailVerified: new Date() })
      .returning({ id: users.id, email: users.email, role: users.role });
    const siteIds = row.role === "steward" ? row.siteIds : [];
    for (const siteId of siteIds) {
      await tx.insert(siteStewards).values({ siteId, userId: user!.id }).onConflictDoNothing();
      await recordAudit(tx, {
        actorId: row.invitedBy,
        action: "site.steward_add",
        entityType: "site",
        entityId: siteId,
        before: null,
        after: { stewardId: user!.id, via: "invitation", invitationId: row.id },
      });
    }
    await tx.update(invitations).set({ usedAt: sql`now()`, acceptedUserId: user!.id }).where(eq(invitations.id, row.id));
    await recordAudit(tx, {
      actorId: user!.id,
      action: "user.create",
      entityType: "user",
      entityId: user!.id,
      before: null,
      after: { email: row.email, role: row.role, siteIds, invitationId: row.id },
    });
    return { userId: user!.id, email: user!.email, role: user!.role };
  });
}

/** Open invitations, newest first, for the admin people page. */
export async function listOpenInvitations({ ctx }: { ctx: Ctx }) {
  requireRole(ctx, "admin");
  return ctx.db
    .select({ id: invitations.id, email: invitations.email, role: invitations.role, expiresAt: invitations.expiresAt, createdAt: invitations.createdAt })
    .from(invitations)
    .where(and(isNull(invitations.usedAt), isNull(invitations.revokedAt), sql`${invitations.expiresAt} > now()`))
    .orderBy(sql`${invitations.createdAt} desc`)
    .limit(100);
}
