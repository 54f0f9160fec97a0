"use server";

import { context } from "@/lib/auth/guard";
import { formObject, runForm, type FormState } from "@/lib/people/form-state";
import { resetPassword } from "@/lib/people/password-reset";
import { resetSchema } from "@/lib/people/schemas";

/** Public: possession of the reset link is the authorisation; the verb checks it. */
export async function resetPasswordAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  return runForm(async () => {
    await resetPassword({ ctx, input: resetSchema.parse(formObject(form)) });
    return null;
  }, "Your password is changed. Sign in with it now.");
}
