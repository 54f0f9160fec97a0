"use client";

import { useActionState } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { Field, Input, Textarea } from "@/components/ui/input";
import type { FormState } from "@/lib/people/form-state";
import { joinAction } from "./actions";

export function JoinForm() {
  const [state, action, pending] = useActionState(joinAction, {} as FormState);
  const fe = state.fieldErrors ?? {};
  if (state.ok) return <Notice tone="ok" title="Request received">{state.ok}</Notice>;
  return (
    <form action={action} className="flex flex-col gap-4 rounded-card border border-line bg-surface p-4" noValidate aria-labelledby="join-title">
      <h2 id="join-title" className="font-bold">
        Ask to join as a volunteer
      </h2>
      <Field label="Your name" htmlFor="name" error={fe.name}>
        <Input id="name" name="name" defaultValue={state.values?.name} autoComplete="name" required aria-invalid={!!fe.name} aria-describedby={fe.name ? "name-error" : undefined} />
      </Field>
      <Field label="E-mail" htmlFor="email" error={fe.email}>
        <Input id="email" name="email" defaultValue={state.values?.email} type="email" autoComplete="email" required aria-invalid={!!fe.email} aria-describedby={fe.email ? "email-error" : undefined} />
      </Field>
      <Field label="Anything the admins should know (optional)" htmlFor="message" error={fe.message} hint="For example where you would measure, or which meter you have.">
        <Textarea id="message" name="message" defaultValue={state.values?.message} rows={4} maxLength={1000} aria-invalid={!!fe.message} aria-describedby={fe.message ? "message-error" : "message-hint"} />
      </Field>
      <div aria-hidden="true" className="hidden">
        <label htmlFor="website">Leave this empty</label>
        <input id="website" name="website" tabIndex={-1} autoComplete="off" />
      </div>
      {state.error && !state.fieldErrors ? <Notice tone="danger">{state.error}</Notice> : null}
      <Button type="submit" disabled={pending}>
        {pending ? "Sending…" : "Ask to join"}
      </Button>
    </form>
  );
}
