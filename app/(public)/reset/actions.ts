"use server";

import { context } from "@/lib/auth/guard";
import { formObject, runForm, type FormState } from "@/lib/people/form-state";
import { requestPasswordReset } from "@/lib/people/password-reset";
import { resetRequestSchema } from "@/lib/people/schemas";

/** Public. Same answer whether or not the address has an account. */
export async function requestResetAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  return runForm(
    () => requestPasswordReset({ ctx, input: resetRequestSchema.parse(formObject(form)) }),
    "If this address has a Nightmark account, a reset link is on its way. It works once, for one hour.",
    form,
  );
}
