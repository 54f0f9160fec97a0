"use server";

// Lives beside its component because app/(app)/settings/actions.ts belongs to the settings page;
// the access table (tests/integration/access-table.ts) lists it like every other action file.
import { context, requireUser } from "@/lib/auth/guard";
import { requestEmailChange } from "@/lib/people/email-change";
import { formObject, runForm, type FormState } from "@/lib/people/form-state";
import { emailChangeSchema } from "@/lib/people/schemas";

export async function requestEmailChangeAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  return runForm(async () => {
    requireUser(ctx);
    return requestEmailChange({ ctx, input: emailChangeSchema.parse(formObject(form)) });
  }, (r) => `Check ${r.newEmail}: open the link we sent within 24 hours. Until then your address stays as it is.`, form);
}
