"use server";

import { eq, sql } from "drizzle-orm";
import { z } from "zod";
import { users } from "@/db/schema";
import { context, requireUser } from "@/lib/auth/guard";
import { hashPassword, verifyPassword } from "@/lib/auth/password";

export type FormState = { ok?: string; error?: string; fieldErrors?: Record<string, string> };

const profileSchema = z.object({ name: z.string().trim().min(1, "Enter a name.").max(80, "At most 80 characters.") });

export async function updateProfile(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  const user = requireUser(ctx);
  const parsed = profileSchema.safeParse({ name: form.get("name") });
  if (!parsed.success) return { fieldErrors: { name: parsed.error.issues[0]?.message ?? "Invalid" } };
  await ctx.db.update(users).set({ name: parsed.data.name }).where(eq(users.id, user.id));
  return { ok: "Saved." };
}

const passwordSchema = z
  .object({
    current: z.string().min(1, "Enter your current password."),
    next: z.string().min(10, "Use at least 10 characters.").max(200),
    confirm: z.string(),
  })
  .refine((v) => v.next === v.confirm, { path: ["confirm"], message: "The two new passwords differ." });

export async function changePassword(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  const user = requireUser(ctx);
  const parsed = passwordSchema.safeParse(Object.fromEntries(form));
  if (!parsed.success) {
    const fieldErrors: Record<string, string> = {};
    for (const i of parsed.error.issues) fieldErrors[String(i.path[0])] ??= i.message;
    return { fieldErrors };
  }
  const [row] = await ctx.db.select({ hash: users.passwordHash }).from(users).where(eq(users.id, user.id));
  if (row?.hash && !(await verifyPassword(parsed.data.current, row.hash)))
    return { fieldErrors: { current: "That is not your current password." } };
  await ctx.db.update(users).set({ passwordHash: await hashPassword(parsed.data.next) }).where(eq(users.id, user.id));
  return { ok: "Password changed." };
}

/** Invalidates every session of this account, including this one. */
export async function signOutEverywhere(): Promise<FormState> {
  const ctx = await context();
  const user = requireUser(ctx);
  await ctx.db.update(users).set({ sessionEpoch: sql`${users.sessionEpoch} + 1` }).where(eq(users.id, user.id));
  return { ok: "Signed out everywhere." };
}
