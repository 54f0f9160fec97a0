import { and, eq, gt, isNull, sql } from "drizzle-orm";
import type { z } from "zod";
import type { Db } from "@/db";
import { passwordResets, users } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import { hashPassword } from "@/lib/auth/password";
import type { Ctx } from "@/lib/auth/guard";
import { env } from "@/lib/env";
import { appLink, linkError, rowProblem, tokenShapeProblem } from "./links";
import { sendResetMail } from "./mail";
import { resetRequestSchema, resetSchema } from "./schemas";
import { hashToken, issueToken, type LinkProblem } from "./tokens";

/** Reset links work for one hour (OWASP Forgot Password Cheat Sheet: short-lived, single-use). */
export const RESET_TTL_MS = 60 * 60_000;
/** At most this many unused links per account per hour, so the form cannot be used to flood an inbox. */
const MAX_OPEN_RESETS = 3;

/** Always answers the same, whether or not the address has an account. */
export async function requestPasswordReset({ ctx, input }: { ctx: Ctx; input: z.input<typeof resetRequestSchema> }) {
  const { email } = resetRequestSchema.parse(input);
  const [user] = await ctx.db.select({ id: users.id, status: users.status }).from(users).where(eq(users.email, email)).limit(1);
  if (!user || user.status !== "active") return { sent: true as const };
  const [{ open }] = (await ctx.db
    .select({ open: sql<number>`count(*)::int` })
    .from(passwordResets)
    .where(and(eq(passwordResets.userId, user.id), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, new Date())))) as [{ open: number }];
  if (open >= MAX_OPEN_RESETS) return { sent: true as const };
  const { token, hash } = issueToken(env().NEXTAUTH_SECRET, "reset");
  const expiresAt = new Date(Date.now() + RESET_TTL_MS);
  await ctx.db.insert(passwordResets).values({ userId: user.id, tokenHash: hash, expiresAt });
  await sendResetMail({ to: email, url: appLink(`/reset/${token}`), expiresAt });
  return { sent: true as const };
}

export async function inspectPasswordReset(db: Db, token: string): Promise<{ ok: true } | { ok: false; problem: LinkProblem }> {
  const shape = tokenShapeProblem("reset", token);
  if (shape) return { ok: false, problem: shape };
  const [row] = await db.select().from(passwordResets).where(eq(passwordResets.tokenHash, hashToken(token))).limit(1);
  const problem = rowProblem(row);
  return problem ? { ok: false, problem } : { ok: true };
}

/**
 * Sets the new password, spends this link and every other open one, clears a lock-out, and signs
 * the account out everywhere (whoever knew the old password is out).
 */
export async function resetPassword({ ctx, input }: { ctx: Ctx; input: z.input<typeof resetSchema> }) {
  const data = resetSchema.parse(input);
  const shape = tokenShapeProblem("reset", data.token);
  if (shape) throw linkError(shape);
  const passwordHash = await hashPassword(data.password);
  return ctx.db.transaction(async (tx) => {
    const [row] = await tx.select().from(passwordResets).where(eq(passwordResets.tokenHash, hashToken(data.token))).for("update").limit(1);
    const problem = rowProblem(row);
    if (problem || !row) throw linkError(problem ?? "invalid");
    const [user] = await tx
      .update(users)
      .set({ passwordHash, failedSignIns: 0, lockedUntil: null, sessionEpoch: sql`${users.sessionEpoch} + 1` })
      .where(and(eq(users.id, row.userId), eq(users.status, "active")))
      .returning({ id: users.id, email: users.email });
    if (!user) throw linkError("invalid");
    await tx
      .update(passwordResets)
      .set({ usedAt: sql`now()` })
      .where(and(eq(passwordResets.userId, row.userId), isNull(passwordResets.usedAt)));
    await recordAudit(tx, { actorId: user.id, action: "user.password_reset", entityType: "user", entityId: user.id });
    return { email: user.email };
  });
}
