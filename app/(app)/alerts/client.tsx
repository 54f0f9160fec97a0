"use client";

import { useActionState, useId } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { Field, Textarea } from "@/components/ui/input";
import type { FormState } from "@/lib/people/form-state";
import { acknowledgeAlertAction, resolveAlertAction } from "./actions";

/** Acknowledge (open alerts) and resolve (open or acknowledged), each with an optional note. */
export function AlertActions({
  alertId,
  status,
  label,
}: {
  alertId: string;
  status: "open" | "acknowledged";
  label: string;
}) {
  const [ackState, ack, ackPending] = useActionState(acknowledgeAlertAction, {} as FormState);
  const [resState, res, resPending] = useActionState(resolveAlertAction, {} as FormState);
  const id = useId();
  const state = resState.ok || resState.error || resState.fieldErrors ? resState : ackState;
  const pending = ackPending || resPending;
  return (
    <form className="mt-3 flex flex-col gap-2" aria-label={`Acknowledge or resolve: ${label}`}>
      <input type="hidden" name="alertId" value={alertId} />
      {state.ok ? <Notice tone="ok">{state.ok}</Notice> : null}
      {state.error ? <Notice tone="danger">{state.error}</Notice> : null}
      <Field
        label="Note (optional)"
        htmlFor={`${id}-note`}
        error={state.fieldErrors?.note}
        hint="Shown with the alert: what you did or know about it."
      >
        <Textarea
          id={`${id}-note`}
          name="note"
          rows={2}
          maxLength={2000}
          defaultValue={state.values?.note ?? ""}
        />
      </Field>
      <div className="flex flex-wrap gap-2">
        {status === "open" ? (
          <Button type="submit" formAction={ack} disabled={pending}>
            {ackPending ? "Acknowledging…" : "Acknowledge"}
          </Button>
        ) : null}
        <Button type="submit" formAction={res} variant="secondary" disabled={pending}>
          {resPending ? "Resolving…" : "Resolve"}
        </Button>
      </div>
    </form>
  );
}
