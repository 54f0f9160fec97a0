"use client";

import { useActionState } from "react";
import { Button } from "@/components/ui/button";
import { Input } from "@/components/ui/input";
import type { FormState } from "@/lib/people/form-state";
import { retireStationAction, transferStationAction } from "./actions";

export function StationRowActions({ stationId, name, retired }: { stationId: string; name: string; retired: boolean }) {
  const [retire, retireAction, retirePending] = useActionState(retireStationAction, {} as FormState);
  const [transfer, transferAction, transferPending] = useActionState(transferStationAction, {} as FormState);
  const err = transfer.fieldErrors?.newOwnerEmail ?? transfer.error ?? retire.error;
  const id = `owner-${stationId}`;
  return (
    <div className="flex flex-col gap-2">
      <form action={transferAction} className="flex flex-wrap items-center gap-2" noValidate>
        <input type="hidden" name="stationId" value={stationId} />
        <label htmlFor={id} className="sr-only">
          New owner&apos;s e-mail for {name}
        </label>
        <Input id={id} name="newOwnerEmail" defaultValue={transfer.values?.newOwnerEmail} type="email" placeholder="new owner's e-mail" className="w-56" aria-invalid={!!transfer.fieldErrors?.newOwnerEmail} aria-describedby={err ? `${id}-msg` : undefined} />
        <Button type="submit" size="sm" variant="secondary" disabled={transferPending}>
          Transfer
        </Button>
      </form>
      {!retired ? (
        <form
          action={retireAction}
          onSubmit={(e) => {
            if (!confirm(`Retire ${name}? Its readings stay; it stops reporting as active.`)) e.preventDefault();
          }}
        >
          <input type="hidden" name="stationId" value={stationId} />
          <Button type="submit" size="sm" variant="danger" disabled={retirePending}>
            Retire
          </Button>
        </form>
      ) : null}
      <p id={`${id}-msg`} aria-live="polite" className={err ? "text-sm text-danger" : "text-sm text-muted"}>
        {err ?? transfer.ok ?? retire.ok}
      </p>
    </div>
  );
}
