"use server";

import { revalidatePath } from "next/cache";
import { context, requireRole } from "@/lib/auth/guard";
import { formObject, runForm, type FormState } from "@/lib/people/form-state";
import { inviteUser } from "@/lib/people/invitations";
import { inviteSchema, setRoleSchema, setStatusSchema } from "@/lib/people/schemas";
import { setUserRole, setUserStatus } from "@/lib/people/users";

export async function inviteAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  return runForm(async () => {
    requireRole(ctx, "admin");
    const input = inviteSchema.parse(formObject(form, ["siteIds"]));
    const r = await inviteUser({ ctx, input });
    revalidatePath("/admin/users");
    return r;
  }, (r) => `Invitation sent to ${r.email}. The link works for 7 days.`, form);
}

export async function setRoleAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  return runForm(async () => {
    requireRole(ctx, "admin");
    const r = await setUserRole({ ctx, input: setRoleSchema.parse(formObject(form)) });
    revalidatePath("/admin/users");
    return r;
  }, (r) => (r.changed ? `Role changed to ${r.role}.` : "No change."), form);
}

export async function setStatusAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  return runForm(async () => {
    requireRole(ctx, "admin");
    const r = await setUserStatus({ ctx, input: setStatusSchema.parse(formObject(form)) });
    revalidatePath("/admin/users");
    return r;
  }, (r) => (r.status === "suspended" ? "Suspended; signed out everywhere." : "Active again."), form);
}
