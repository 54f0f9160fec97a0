"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { context, requireUser } from "@/lib/auth/guard";
import { formObject, runForm, type FormState } from "@/lib/people/form-state";
import { addCalibration } from "@/lib/stations/calibrations";
import { createToken, revokeToken } from "@/lib/stations/tokens";

const tokenNameSchema = z.object({
  stationSlug: z.string().min(1),
  name: z.string().trim().min(1, "Name the token after the meter or logger that will use it.").max(100, "Keep the name under 100 characters."),
});

export type CreatedToken = { id: string; name: string; prefix: string; token: string };

/** Creates a station token; the secret comes back this once. */
export async function createTokenAction(_prev: FormState<CreatedToken>, form: FormData): Promise<FormState<CreatedToken>> {
  const ctx = await context();
  const state = await runForm(async () => {
    requireUser(ctx);
    const input = tokenNameSchema.parse(formObject(form));
    return createToken({ ctx, input: { stationSlug: input.stationSlug, name: input.name } });
  }, (t) => `Token “${t.name}” created.`);
  if (state.ok) revalidatePath(`/stations/${String(form.get("stationSlug"))}`);
  return state;
}

export async function revokeTokenAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  const state = await runForm(async () => {
    requireUser(ctx);
    const input = z.object({ stationSlug: z.string().min(1), tokenId: z.string().uuid("Unknown token.") }).parse(formObject(form));
    return revokeToken({ ctx, input });
  }, (t) => `Token ${t.prefix}… revoked. A meter still using it now gets “revoked”.`);
  if (state.ok) revalidatePath(`/stations/${String(form.get("stationSlug"))}`);
  return state;
}

export async function addCalibrationAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  const state = await runForm(async () => {
    requireUser(ctx);
    return addCalibration({ ctx, input: formObject(form) as never });
  }, (c) => `Offset ${c.offsetMag >= 0 ? "+" : "−"}${Math.abs(c.offsetMag).toFixed(2)} from ${c.effectiveFrom} added; ${c.nightsMarked} night${c.nightsMarked === 1 ? "" : "s"} will be recomputed in the background.`, form);
  if (state.ok) revalidatePath(`/stations/${String(form.get("stationSlug"))}`);
  return state;
}
