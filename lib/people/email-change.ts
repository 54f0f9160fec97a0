import { and, eq, isNull, sql } from "drizzle-orm";
import type { z } from "zod";
import type { Db } from "@/db";
import { emailChanges, users } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import { verifyPassword } from "@/lib/auth/password";
import { requireUser, type Ctx } from "@/lib/auth/guard";
import { env } from "@/lib/env";
import { badRequest, conflict } from "@/lib/errors";
import { appLink, linkError, rowProblem, tokenShapeProblem } from "./links";
import { sendEmailChangeMail, sendEmailChangeNotice } from "./mail";
import { emailChangeSchema, tokenSchema } from "./schemas";
import { hashToken, issueToken, type LinkProblem } from "./tokens";

export const EMAIL_CHANGE_TTL_MS = 24 * 3600_000;

/**
 * A signed-in person asks for a new address: the password proves it is them, the link sent to the
 * new address proves they read it, and the old address is told.
 */
export async function requestEmailChange({ ctx, input }: { ctx: Ctx; input: z.input<typeof emailChangeSchema> }) {
  const me = requireUser(ctx);
  const data = emailChangeSchema.parse(input);
  if (data.newEmail === me.email) throw badRequest("That is already your address.", { field: "newEmail" });
  const [row] = await ctx.db.select({ hash: users.passwordHash }).from(users).where(eq(users.id, me.id)).limit(1);
  if (row?.hash && !(await verifyPassword(data.password, row.hash))) throw badRequest("That is not your current password.", { field: "password" });
  const [taken] = await ctx.db.select({ id: users.id }).from(users).where(eq(users.email, data.newEmail)).limit(1);
  if (taken) throw conflict("Another account uses this address.", { field: "newEmail" });
  const { token, hash } = issueToken(env().NEXTAUTH_SECRET, "email");
  const expiresAt = new Date(Date.now() + EMAIL_CHANGE_TTL_MS);
  await ctx.db.transaction(async (tx) => {
    // Only the newest request stands.
    await tx.update(emailChanges).set({ usedAt: sql`now()` }).where(and(eq(emailChanges.userId, me.id), isNull(emailChanges.usedAt)));
    await tx.insert(emailChanges).values({ userId: me.id, newEmail: data.newEmail, tokenHash: hash, expiresAt });
  });
  await sendEmailChangeMail({ to: data.newEmail, url: appLink(`/confirm-email/${token}`), expiresAt });
  await sendEmailChangeNotice({ to: me.email, newEmail: data.newEmail });
  return { newEmail: data.newEmail, expiresAt };
}

export async function inspectEmailChange(db: Db, token: string): Promise<{ ok: true; newEmail: string } | { ok: false; problem: LinkProblem }> {
  const shape = tokenShapeProblem("email", token);
  if (shape) return { ok: false, problem: shape };
  const [row] = await db.select().from(emailChanges).where(eq(emailChanges.tokenHash, hashToken(token))).limit(1);
  const problem = rowProblem(row);
  return problem || !row ? { ok: false, problem: problem ?? "invalid" } : { ok: true, newEmail: row.newEmail };
}

/** Whoever holds the link (sent to the new address) confirms it; no session needed. */
export async function confirmEmailChange({ ctx, input }: { ctx: Ctx; input: z.input<typeof tokenSchema> }) {
  const { token } = tokenSchema.parse(input);
  const shape = tokenShapeProblem("email", token);
  if (shape) throw linkError(shape);
  return ctx.db.transaction(async (tx) => {
    const [row] = await tx.select().from(emailChanges).where(eq(emailChanges.tokenHash, hashToken(token))).for("update").limit(1);
    const problem = rowProblem(row);
    if (problem || !row) throw linkError(problem ?? "invalid");
    const [taken] = await tx.select({ id: users.id }).from(users).where(eq(users.email, row.newEmail)).limit(1);
    if (taken) throw conflict("Another account took this address in the meantime.");
    const [before] = await tx.select({ email: users.email }).from(users).where(eq(users.id, row.userId)).limit(1);
    if (!before) throw linkError("invalid");
    await tx.update(users).set({ email: row.newEmail, emailVerified: new Date() }).where(eq(users.id, row.userId));
    await tx.update(emailChanges).set({ usedAt: sql`now()` }).where(eq(emailChanges.id, row.id));
    await recordAudit(tx, {
      actorId: row.userId,
      action: "user.email_change",
      entityType: "user",
      entityId: row.userId,
      before: { email: before.email },
      after: { email: row.newEmail },
    });
    return { email: row.newEmail };
  });
}
