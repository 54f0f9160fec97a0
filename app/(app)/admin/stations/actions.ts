"use server";

import { revalidatePath } from "next/cache";
import { context, requireRole } from "@/lib/auth/guard";
import { formObject, runForm, type FormState } from "@/lib/people/form-state";
import { stationIdSchema, transferSchema } from "@/lib/people/schemas";
import { retireStation, transferStation } from "@/lib/people/stations-admin";

export async function retireStationAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  return runForm(async () => {
    requireRole(ctx, "admin");
    const r = await retireStation({ ctx, input: stationIdSchema.parse(formObject(form)) });
    revalidatePath("/admin/stations");
    return r;
  }, "Retired. Its readings and history are kept.", form);
}

export async function transferStationAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  return runForm(async () => {
    requireRole(ctx, "admin");
    const r = await transferStation({ ctx, input: transferSchema.parse(formObject(form)) });
    revalidatePath("/admin/stations");
    return r;
  }, "Transferred.", form);
}
