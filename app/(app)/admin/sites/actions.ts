"use server";

import { revalidatePath } from "next/cache";
import { context, requireRole } from "@/lib/auth/guard";
import { formObject, runForm, type FormState } from "@/lib/people/form-state";
import { removeStewardSchema, stewardSchema } from "@/lib/people/schemas";
import { addSiteSteward, removeSiteSteward } from "@/lib/people/site-stewards";

export async function addStewardAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  return runForm(async () => {
    requireRole(ctx, "admin");
    const r = await addSiteSteward({ ctx, input: stewardSchema.parse(formObject(form)) });
    revalidatePath("/admin/sites");
    return r;
  }, (r) => (r.changed ? "Steward added." : "They already keep this site."), form);
}

export async function removeStewardAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  return runForm(async () => {
    requireRole(ctx, "admin");
    const r = await removeSiteSteward({ ctx, input: removeStewardSchema.parse(formObject(form)) });
    revalidatePath("/admin/sites");
    return r;
  }, "Steward removed.", form);
}
