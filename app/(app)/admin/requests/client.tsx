"use client";

import { useActionState } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { Field, Input } from "@/components/ui/input";
import type { FormState } from "@/lib/people/form-state";
import { decideJoinAction } from "./actions";

export function DecideJoinForm({ id, name }: { id: string; name: string }) {
  const [state, action, pending] = useActionState(decideJoinAction, {} as FormState);
  if (state.ok) return <Notice tone="ok">{state.ok}</Notice>;
  return (
    <form action={action} className="flex flex-col gap-3" aria-label={`Decide on ${name}'s request`}>
      <input type="hidden" name="id" value={id} />
      <Field label="Note for a decline (optional, sent to them)" htmlFor={`note-${id}`}>
        <Input id={`note-${id}`} name="note" maxLength={500} />
      </Field>
      {state.error ? <Notice tone="danger">{state.error}</Notice> : null}
      <div className="flex flex-wrap gap-2">
        <Button type="submit" name="decision" value="approve" disabled={pending}>
          Approve as volunteer
        </Button>
        <Button type="submit" name="decision" value="decline" variant="secondary" disabled={pending}>
          Decline
        </Button>
      </div>
    </form>
  );
}
