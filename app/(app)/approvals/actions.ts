"use server";

// No revalidatePath: the card stays on screen with its outcome; the list is fresh on the next visit.
import { context, requireRole } from "@/lib/auth/guard";
import { formObject, runForm, type FormState } from "@/lib/people/form-state";
import { decideStationApproval, decideStationSchema } from "@/lib/stations/register";

export async function decideStationAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  return runForm(async () => {
    requireRole(ctx, "steward");
    const r = await decideStationApproval({ ctx, input: decideStationSchema.parse(formObject(form)) });
    return r;
  }, (r) => (r.approval === "approved" ? "Approved: its readings now count toward the site." : "Declined: it stays the volunteer's, outside the site's record."));
}
