"use client";

import Link from "next/link";
import { useActionState } from "react";
import { NewPasswordFields } from "@/components/account/password-fields";
import { Button, buttonVariants } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import type { FormState } from "@/lib/people/form-state";
import { resetPasswordAction } from "./actions";

export function ResetPasswordForm({ token }: { token: string }) {
  const [state, action, pending] = useActionState(resetPasswordAction, {} as FormState);
  if (state.ok)
    return (
      <div className="flex flex-col gap-4">
        <Notice tone="ok">{state.ok}</Notice>
        <Link href="/signin" className={buttonVariants()}>
          Sign in
        </Link>
      </div>
    );
  return (
    <form action={action} className="flex flex-col gap-4 rounded-card border border-line bg-surface p-4" noValidate>
      <input type="hidden" name="token" value={token} />
      <NewPasswordFields errors={state.fieldErrors} />
      {state.error && !state.fieldErrors ? <Notice tone="danger">{state.error}</Notice> : null}
      <Button type="submit" disabled={pending}>
        {pending ? "Saving…" : "Set the new password"}
      </Button>
    </form>
  );
}
