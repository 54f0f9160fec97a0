"use client";

import { useActionState, useState } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { Field, Input, Select } from "@/components/ui/input";
import type { FormState } from "@/lib/people/form-state";
import { inviteAction, setRoleAction, setStatusAction } from "./actions";

const ROLES = ["volunteer", "steward", "advocate", "admin"] as const;

export function InviteForm({ sites }: { sites: { id: string; name: string }[] }) {
  const [state, action, pending] = useActionState(inviteAction, {} as FormState);
  const [role, setRole] = useState<string>("volunteer");
  const fe = state.fieldErrors ?? {};
  return (
    <form action={action} className="flex flex-col gap-4" aria-labelledby="invite-title" noValidate>
      <h2 id="invite-title" className="font-bold">
        Invite someone
      </h2>
      <div className="grid gap-4 sm:grid-cols-2">
        <Field label="E-mail" htmlFor="invite-email" error={fe.email}>
          <Input id="invite-email" name="email" defaultValue={state.values?.email} type="email" autoComplete="off" required aria-invalid={!!fe.email} aria-describedby={fe.email ? "invite-email-error" : undefined} />
        </Field>
        <Field label="Role" htmlFor="invite-role" error={fe.role}>
          <Select id="invite-role" name="role" value={role} onChange={(e) => setRole(e.target.value)} aria-invalid={!!fe.role}>
            {ROLES.map((r) => (
              <option key={r} value={r}>
                {r}
              </option>
            ))}
          </Select>
        </Field>
      </div>
      {role === "steward" ? (
        <fieldset className="flex flex-col gap-2" aria-describedby={fe.siteIds ? "invite-sites-error" : undefined}>
          <legend className="text-sm font-bold">Sites they will keep</legend>
          {sites.length === 0 ? <p className="text-sm text-muted">No sites yet.</p> : null}
          {sites.map((s) => (
            <label key={s.id} className="flex min-h-11 items-center gap-3">
              <input type="checkbox" name="siteIds" value={s.id} className="h-5 w-5" />
              {s.name}
            </label>
          ))}
          {fe.siteIds ? (
            <p id="invite-sites-error" role="alert" className="text-sm text-danger">
              {fe.siteIds}
            </p>
          ) : null}
        </fieldset>
      ) : null}
      {state.error && !state.fieldErrors ? <Notice tone="danger">{state.error}</Notice> : null}
      {state.ok ? <Notice tone="ok">{state.ok}</Notice> : null}
      <Button type="submit" disabled={pending} className="self-start">
        {pending ? "Sending…" : "Send invitation"}
      </Button>
    </form>
  );
}

export function UserRowActions({ userId, role, status, self }: { userId: string; role: string; status: string; self: boolean }) {
  const [roleState, roleAction, rolePending] = useActionState(setRoleAction, {} as FormState);
  const [statusState, statusAction, statusPending] = useActionState(setStatusAction, {} as FormState);
  if (self) return <span className="text-sm text-muted">This is you</span>;
  const message = roleState.error ?? statusState.error ?? roleState.ok ?? statusState.ok;
  return (
    <div className="flex flex-wrap items-center gap-2">
      <form action={roleAction} className="flex items-center gap-2">
        <input type="hidden" name="userId" value={userId} />
        <label className="sr-only" htmlFor={`role-${userId}`}>
          Role
        </label>
        <Select id={`role-${userId}`} name="role" defaultValue={role} className="w-auto">
          {ROLES.map((r) => (
            <option key={r} value={r}>
              {r}
            </option>
          ))}
        </Select>
        <Button type="submit" size="sm" variant="secondary" disabled={rolePending}>
          Save role
        </Button>
      </form>
      <form
        action={statusAction}
        onSubmit={(e) => {
          if (status === "active" && !confirm("Suspend this account? They are signed out everywhere at once.")) e.preventDefault();
        }}
      >
        <input type="hidden" name="userId" value={userId} />
        <input type="hidden" name="status" value={status === "active" ? "suspended" : "active"} />
        <Button type="submit" size="sm" variant={status === "active" ? "danger" : "secondary"} disabled={statusPending}>
          {status === "active" ? "Suspend" : "Unsuspend"}
        </Button>
      </form>
      <p aria-live="polite" className={roleState.error || statusState.error ? "w-full text-sm text-danger" : "w-full text-sm text-muted"}>
        {message}
      </p>
    </div>
  );
}
