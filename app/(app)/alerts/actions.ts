"use server";

import { revalidatePath } from "next/cache";
import { context, requireRole } from "@/lib/auth/guard";
import { acknowledgeAlert, alertDecisionSchema, resolveAlert } from "@/lib/alerts/service";
import { formObject, runForm, type FormState } from "@/lib/people/form-state";

export async function acknowledgeAlertAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  const r = await runForm(
    async () => {
      requireRole(ctx, "steward");
      return acknowledgeAlert({ ctx, input: alertDecisionSchema.parse(formObject(form)) });
    },
    "Acknowledged. It stays on the list until it clears or you resolve it.",
    form,
  );
  if (r.ok) revalidatePath("/alerts");
  return { ...r, data: undefined };
}

export async function resolveAlertAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  const r = await runForm(
    async () => {
      requireRole(ctx, "steward");
      return resolveAlert({ ctx, input: alertDecisionSchema.parse(formObject(form)) });
    },
    "Resolved. If the condition still holds, the next evaluation opens a new alert.",
    form,
  );
  if (r.ok) revalidatePath("/alerts");
  return { ...r, data: undefined };
}
