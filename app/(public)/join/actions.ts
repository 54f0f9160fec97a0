"use server";

import { context } from "@/lib/auth/guard";
import { formObject, runForm, type FormState } from "@/lib/people/form-state";
import { requestToJoin } from "@/lib/people/join-requests";
import { joinSchema } from "@/lib/people/schemas";

/** Public: anyone may ask to join. The reply never says whether the address has an account. */
export async function joinAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  return runForm(async () => {
    // A filled hidden field means a form-filling robot, not a person: accept silently, store nothing.
    if (String(form.get("website") ?? "") !== "") return { received: true };
    return requestToJoin({ ctx, input: joinSchema.parse(formObject(form)) });
  }, "Thank you. An admin will look at your request; you will hear from us by e-mail either way.", form);
}
