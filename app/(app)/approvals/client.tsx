"use client";

import { useActionState } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import type { FormState } from "@/lib/people/form-state";
import { decideStationAction } from "./actions";

export function DecideStationForm({ stationId, name }: { stationId: string; name: string }) {
  const [state, action, pending] = useActionState(decideStationAction, {} as FormState);
  if (state.ok) return <Notice tone="ok">{state.ok}</Notice>;
  return (
    <form action={action} className="mt-3 flex flex-col gap-2" aria-label={`Decide on ${name}`}>
      <input type="hidden" name="stationId" value={stationId} />
      {state.error ? <Notice tone="danger">{state.error}</Notice> : null}
      <div className="flex flex-wrap gap-2">
        <Button type="submit" name="decision" value="approve" disabled={pending}>
          Approve
        </Button>
        <Button type="submit" name="decision" value="decline" variant="secondary" disabled={pending}>
          Decline
        </Button>
      </div>
    </form>
  );
}
