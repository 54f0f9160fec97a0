"use client";

import { signIn } from "next-auth/react";
import { useActionState, useEffect, useRef } from "react";
import { NewPasswordFields } from "@/components/account/password-fields";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { Field, Input } from "@/components/ui/input";
import type { FormState } from "@/lib/people/form-state";
import { acceptInviteAction } from "./actions";

export function AcceptInviteForm({ token, email }: { token: string; email: string }) {
  const [state, action, pending] = useActionState(acceptInviteAction, {} as FormState);
  const password = useRef("");
  const fe = state.fieldErrors ?? {};
  useEffect(() => {
    // Signed straight in with the password just chosen.
    if (state.ok) void signIn("password", { email, password: password.current, callbackUrl: "/dashboard" });
  }, [state.ok, email]);
  if (state.ok) return <Notice tone="ok">Your account is ready. Signing you in…</Notice>;
  return (
    <form
      action={action}
      onSubmit={(e) => {
        password.current = String(new FormData(e.currentTarget).get("password") ?? "");
      }}
      className="flex flex-col gap-4 rounded-card border border-line bg-surface p-4"
      noValidate
    >
      <input type="hidden" name="token" value={token} />
      <Field label="E-mail" htmlFor="email" hint="The address the invitation was sent to.">
        <Input id="email" value={email} readOnly autoComplete="username" aria-describedby="email-hint" />
      </Field>
      <Field label="Your name" htmlFor="name" error={fe.name}>
        <Input id="name" name="name" defaultValue={state.values?.name} autoComplete="name" required aria-invalid={!!fe.name} aria-describedby={fe.name ? "name-error" : undefined} />
      </Field>
      <NewPasswordFields errors={fe} />
      {state.error && !state.fieldErrors ? <Notice tone="danger">{state.error}</Notice> : null}
      <Button type="submit" disabled={pending}>
        {pending ? "Creating your account…" : "Create my account"}
      </Button>
    </form>
  );
}
