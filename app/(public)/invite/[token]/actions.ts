"use server";

import { context } from "@/lib/auth/guard";
import { formObject, runForm, type FormState } from "@/lib/people/form-state";
import { acceptInvitation } from "@/lib/people/invitations";
import { acceptInviteSchema } from "@/lib/people/schemas";

/** Public: possession of the invitation link is the authorisation; the verb checks it. */
export async function acceptInviteAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  return runForm(async () => {
    const r = await acceptInvitation({ ctx, input: acceptInviteSchema.parse(formObject(form)) });
    return { email: r.email };
  }, "Your account is ready.", form);
}
