"use client";

import { useActionState } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import type { FormState } from "@/lib/people/form-state";
import { confirmEmailAction } from "./actions";

/** A button, not a bare GET: mail scanners that open links must not spend them. */
export function ConfirmEmailForm({ token }: { token: string }) {
  const [state, action, pending] = useActionState(confirmEmailAction, {} as FormState);
  if (state.ok) return <Notice tone="ok">{state.ok}</Notice>;
  return (
    <form action={action} className="flex flex-col gap-4">
      <input type="hidden" name="token" value={token} />
      {state.error ? <Notice tone="danger">{state.error}</Notice> : null}
      <Button type="submit" disabled={pending} className="self-start">
        {pending ? "Confirming…" : "Confirm this address"}
      </Button>
    </form>
  );
}
