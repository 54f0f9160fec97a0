import { and, desc, eq, sql } from "drizzle-orm";
import type { z } from "zod";
import { joinRequests, users } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import { requireRole, type Ctx } from "@/lib/auth/guard";
import { conflict, notFound } from "@/lib/errors";
import { createInvitationRecord } from "./invitations";
import { appLink } from "./links";
import { sendAlreadyMemberMail, sendJoinApprovedMail, sendJoinDeclinedMail, sendJoinRequestToAdmins } from "./mail";
import { decideJoinSchema, joinSchema } from "./schemas";

/** Open requests per address, so the public form cannot flood the admins' list. */
const MAX_PENDING_PER_EMAIL = 1;
const MAX_PENDING_TOTAL = 500;

/**
 * Anyone may ask to join as a volunteer. The answer is the same whether or not the address has an
 * account (no account discovery through this form); an existing member gets a reset link by mail.
 */
export async function requestToJoin({ ctx, input }: { ctx: Ctx; input: z.input<typeof joinSchema> }) {
  const data = joinSchema.parse(input);
  const [member] = await ctx.db.select({ id: users.id }).from(users).where(eq(users.email, data.email)).limit(1);
  if (member) {
    await sendAlreadyMemberMail({ to: data.email, resetUrl: appLink("/reset") });
    return { received: true as const };
  }
  const [{ mine, total }] = (await ctx.db
    .select({
      mine: sql<number>`count(*) filter (where ${joinRequests.email} = ${data.email})::int`,
      total: sql<number>`count(*)::int`,
    })
    .from(joinRequests)
    .where(eq(joinRequests.status, "pending"))) as [{ mine: number; total: number }];
  if (mine >= MAX_PENDING_PER_EMAIL) return { received: true as const };
  if (total >= MAX_PENDING_TOTAL) throw conflict("We cannot take new requests right now. Try again in a few days.");
  await ctx.db.insert(joinRequests).values({ name: data.name, email: data.email, message: data.message });
  const admins = await ctx.db
    .select({ email: users.email })
    .from(users)
    .where(and(eq(users.role, "admin"), eq(users.status, "active")));
  await sendJoinRequestToAdmins({ to: admins.map((a) => a.email), name: data.name, email: data.email, url: appLink("/admin/requests") });
  return { received: true as const };
}

export async function listJoinRequests({ ctx, input }: { ctx: Ctx; input?: { status?: "pending" | "approved" | "declined" } }) {
  requireRole(ctx, "admin");
  const status = input?.status ?? "pending";
  return ctx.db
    .select()
    .from(joinRequests)
    .where(eq(joinRequests.status, status))
    .orderBy(status === "pending" ? joinRequests.createdAt : desc(joinRequests.decidedAt))
    .limit(200);
}

/** Approve (an invitation link goes out, as a volunteer) or decline (a polite e-mail goes out). */
export async function decideJoinRequest({ ctx, input }: { ctx: Ctx; input: z.input<typeof decideJoinSchema> }) {
  const admin = requireRole(ctx, "admin");
  const data = decideJoinSchema.parse(input);
  const result = await ctx.db.transaction(async (tx) => {
    const [req] = await tx.select().from(joinRequests).where(eq(joinRequests.id, data.id)).for("update").limit(1);
    if (!req) throw notFound("The join request");
    if (req.status !== "pending") throw conflict(`This request was already ${req.status}.`);
    const status = data.decision === "approve" ? ("approved" as const) : ("declined" as const);
    await tx.update(joinRequests).set({ status, decidedBy: admin.id, decidedAt: new Date() }).where(eq(joinRequests.id, req.id));
    let invite: Awaited<ReturnType<typeof createInvitationRecord>> | null = null;
    if (status === "approved") {
      const [member] = await tx.select({ id: users.id }).from(users).where(eq(users.email, req.email)).limit(1);
      if (member) throw conflict("This address has an account already; there is nothing to approve.");
      invite = await createInvitationRecord(tx, { email: req.email, role: "volunteer", siteIds: [], invitedBy: admin.id, joinRequestId: req.id });
    }
    await recordAudit(tx, {
      actorId: admin.id,
      action: `join_request.${data.decision}`,
      entityType: "invitation",
      entityId: invite?.id ?? req.id,
      before: { joinRequestId: req.id, email: req.email, status: "pending" },
      after: { joinRequestId: req.id, email: req.email, status, role: invite ? "volunteer" : null },
    });
    return { req, invite, status };
  });
  if (result.invite) {
    await sendJoinApprovedMail({ to: result.req.email, name: result.req.name, url: result.invite.url, expiresAt: result.invite.expiresAt });
  } else {
    await sendJoinDeclinedMail({ to: result.req.email, name: result.req.name, note: data.note || undefined });
  }
  return { id: result.req.id, status: result.status };
}
