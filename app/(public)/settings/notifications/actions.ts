"use server";

import { context, requireUser } from "@/lib/auth/guard";
import { updateMyNotificationSettings, updateSettingsByToken } from "@/lib/alerts/service";
import { runForm, type FormState } from "@/lib/people/form-state";

const on = (form: FormData, name: string) => form.get(name) === "on";

export async function saveMyNotificationsAction(
  _prev: FormState,
  form: FormData,
): Promise<FormState> {
  const ctx = await context();
  const r = await runForm(async () => {
    requireUser(ctx);
    return updateMyNotificationSettings({
      ctx,
      input: { alertsEmail: on(form, "alertsEmail"), weeklyDigest: on(form, "weeklyDigest") },
    });
  }, "Saved.");
  return { ...r, data: undefined };
}

/** The link in an e-mail is the authorisation: it can only change these two settings. */
export async function saveNotificationsByTokenAction(
  _prev: FormState,
  form: FormData,
): Promise<FormState> {
  const ctx = await context();
  const r = await runForm(
    () =>
      updateSettingsByToken({
        ctx,
        input: {
          token: String(form.get("token") ?? ""),
          alertsEmail: on(form, "alertsEmail"),
          weeklyDigest: on(form, "weeklyDigest"),
        },
      }),
    (v) =>
      v.alertsEmail || v.weeklyDigest
        ? "Saved."
        : "Saved: you will get no more alert e-mails or digests.",
  );
  return { ...r, data: undefined };
}
