"use client";

import { useActionState } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { Field, Input } from "@/components/ui/input";
import type { FormState } from "@/lib/people/form-state";
import { requestResetAction } from "./actions";

export function RequestResetForm() {
  const [state, action, pending] = useActionState(requestResetAction, {} as FormState);
  const err = state.fieldErrors?.email;
  return (
    <form action={action} className="flex flex-col gap-4 rounded-card border border-line bg-surface p-4" noValidate>
      <Field label="Your account's e-mail" htmlFor="email" error={err}>
        <Input id="email" name="email" defaultValue={state.values?.email} type="email" autoComplete="email" required aria-invalid={!!err} aria-describedby={err ? "email-error" : undefined} />
      </Field>
      {state.ok ? <Notice tone="ok">{state.ok}</Notice> : null}
      {state.error && !state.fieldErrors ? <Notice tone="danger">{state.error}</Notice> : null}
      <Button type="submit" disabled={pending}>
        {pending ? "Sending…" : "E-mail me a reset link"}
      </Button>
    </form>
  );
}
