"use client";

import { useActionState } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { Field, Input } from "@/components/ui/input";
import type { FormState } from "@/lib/people/form-state";
import { addStewardAction, removeStewardAction } from "./actions";

export function AddStewardForm({ siteId, siteName }: { siteId: string; siteName: string }) {
  const [state, action, pending] = useActionState(addStewardAction, {} as FormState);
  const err = state.fieldErrors?.email;
  const id = `steward-${siteId}`;
  return (
    <form action={action} className="mt-3 flex flex-col gap-2" aria-label={`Add a steward to ${siteName}`} noValidate>
      <input type="hidden" name="siteId" value={siteId} />
      <Field label="Add a steward by e-mail" htmlFor={id} error={err} hint="They need the steward role.">
        <Input id={id} name="email" defaultValue={state.values?.email} type="email" aria-invalid={!!err} aria-describedby={err ? `${id}-error` : `${id}-hint`} />
      </Field>
      {state.error && !state.fieldErrors ? <Notice tone="danger">{state.error}</Notice> : null}
      {state.ok ? <Notice tone="ok">{state.ok}</Notice> : null}
      <Button type="submit" variant="secondary" size="sm" disabled={pending} className="self-start">
        Add steward
      </Button>
    </form>
  );
}

export function RemoveStewardButton({ siteId, userId, label }: { siteId: string; userId: string; label: string }) {
  const [state, action, pending] = useActionState(removeStewardAction, {} as FormState);
  return (
    <form action={action}>
      <input type="hidden" name="siteId" value={siteId} />
      <input type="hidden" name="userId" value={userId} />
      <Button type="submit" size="sm" variant="ghost" disabled={pending} aria-label={`Remove ${label} as steward`}>
        Remove
      </Button>
      {state.error ? (
        <span role="alert" className="text-sm text-danger">
          {state.error}
        </span>
      ) : null}
    </form>
  );
}
