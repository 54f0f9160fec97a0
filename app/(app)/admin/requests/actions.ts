"use server";

// No revalidatePath: the card stays on screen with its outcome; the list is fresh on the next visit.
import { context, requireRole } from "@/lib/auth/guard";
import { formObject, runForm, type FormState } from "@/lib/people/form-state";
import { decideJoinRequest } from "@/lib/people/join-requests";
import { decideJoinSchema } from "@/lib/people/schemas";

export async function decideJoinAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  return runForm(async () => {
    requireRole(ctx, "admin");
    const r = await decideJoinRequest({ ctx, input: decideJoinSchema.parse(formObject(form)) });
    return r;
  }, (r) => (r.status === "approved" ? "Approved: an invitation link is on its way." : "Declined: they have been told by e-mail."), form);
}
