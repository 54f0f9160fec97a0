"use client";

import { useActionState } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import type { FormState } from "@/lib/people/form-state";
import { saveMyNotificationsAction, saveNotificationsByTokenAction } from "./actions";

export function NotificationForm({
  token,
  alertsEmail,
  weeklyDigest,
}: {
  token?: string;
  alertsEmail: boolean;
  weeklyDigest: boolean;
}) {
  const [state, action, pending] = useActionState(
    token ? saveNotificationsByTokenAction : saveMyNotificationsAction,
    {} as FormState,
  );
  return (
    <form action={action} className="flex flex-col gap-3" aria-label="Notification settings">
      {token ? <input type="hidden" name="token" value={token} /> : null}
      {state.ok ? <Notice tone="ok">{state.ok}</Notice> : null}
      {state.error ? <Notice tone="danger">{state.error}</Notice> : null}
      <label className="flex min-h-11 items-start gap-3">
        <input
          type="checkbox"
          name="alertsEmail"
          defaultChecked={alertsEmail}
          className="accent-accent mt-1 size-5"
          aria-describedby="alerts-email-hint"
        />
        <span>
          <span className="font-bold">Alert e-mails</span>
          <span id="alerts-email-hint" className="text-muted block text-sm">
            One e-mail when an alert opens at a site you keep. Alerts always appear on the Alerts
            page.
          </span>
        </span>
      </label>
      <label className="flex min-h-11 items-start gap-3">
        <input
          type="checkbox"
          name="weeklyDigest"
          defaultChecked={weeklyDigest}
          className="accent-accent mt-1 size-5"
          aria-describedby="digest-hint"
        />
        <span>
          <span className="font-bold">Weekly digest</span>
          <span id="digest-hint" className="text-muted block text-sm">
            Mondays at 08:00 UTC: each of your sites' last 7 nights against its target.
          </span>
        </span>
      </label>
      <div>
        <Button type="submit" disabled={pending}>
          {pending ? "Saving…" : "Save"}
        </Button>
      </div>
    </form>
  );
}
