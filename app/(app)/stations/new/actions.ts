"use server";

import { context, requireRole } from "@/lib/auth/guard";
import { formObject, runForm, type FormState } from "@/lib/people/form-state";
import { registerStation, registerStationSchema } from "@/lib/stations/register";

export type RegisteredStation = Awaited<ReturnType<typeof registerStation>>;

export async function registerStationAction(_prev: FormState<RegisteredStation>, form: FormData): Promise<FormState<RegisteredStation>> {
  const ctx = await context();
  return runForm(async () => {
    requireRole(ctx, "volunteer", "steward");
    return registerStation({ ctx, input: registerStationSchema.parse(formObject(form)) });
  }, (r) =>
    r.approval === "pending"
      ? `${r.name} is registered inside ${r.site?.name}. Its stewards have been asked to approve it; its readings are kept meanwhile.`
      : r.approval === "approved"
        ? `${r.name} is registered and counts toward ${r.site?.name} (you keep that site).`
        : `${r.name} is registered.`,
    form,
  );
}
