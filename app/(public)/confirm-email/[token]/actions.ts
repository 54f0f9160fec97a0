"use server";

import { context } from "@/lib/auth/guard";
import { formObject, runForm, type FormState } from "@/lib/people/form-state";
import { confirmEmailChange } from "@/lib/people/email-change";
import { tokenSchema } from "@/lib/people/schemas";

/** Public: the link went to the new address, so holding it is the proof; the verb checks it. */
export async function confirmEmailAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  return runForm(
    () => confirmEmailChange({ ctx, input: tokenSchema.parse(formObject(form)) }),
    (r) => `Done: your account now uses ${r.email}. Sign in with it from now on.`,
  );
}
