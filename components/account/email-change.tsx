"use client";

import { useActionState } from "react";
import { Button } from "@/components/ui/button";
import { Card, Notice } from "@/components/ui/card";
import { Field, Input } from "@/components/ui/input";
import type { FormState } from "@/lib/people/form-state";
import { requestEmailChangeAction } from "./email-change-action";

export type EmailChangeProps = { currentEmail: string };

/** Settings section: change the account's e-mail address, confirmed by a link sent to the new one. */
export function EmailChange({ currentEmail }: EmailChangeProps) {
  const [state, action, pending] = useActionState(requestEmailChangeAction, {} as FormState);
  const fe = state.fieldErrors ?? {};
  return (
    <Card>
      <form action={action} className="flex flex-col gap-4" noValidate aria-labelledby="email-change-title">
        <h2 id="email-change-title" className="font-bold">
          E-mail address
        </h2>
        <p className="text-sm text-muted">
          Now: <span className="break-all text-fg">{currentEmail}</span>. The new address is used once you open the link we send to it.
        </p>
        <Field label="New e-mail address" htmlFor="newEmail" error={fe.newEmail}>
          <Input id="newEmail" name="newEmail" defaultValue={state.values?.newEmail} type="email" autoComplete="email" required aria-invalid={!!fe.newEmail} aria-describedby={fe.newEmail ? "newEmail-error" : undefined} />
        </Field>
        <Field label="Your current password" htmlFor="email-change-password" error={fe.password}>
          <Input
            id="email-change-password"
            name="password"
            type="password"
            autoComplete="current-password"
            aria-invalid={!!fe.password}
            aria-describedby={fe.password ? "email-change-password-error" : undefined}
          />
        </Field>
        {state.ok ? <Notice tone="ok">{state.ok}</Notice> : null}
        {state.error && !state.fieldErrors ? <Notice tone="danger">{state.error}</Notice> : null}
        <Button type="submit" disabled={pending}>
          {pending ? "Sending…" : "Send the confirmation link"}
        </Button>
      </form>
    </Card>
  );
}
