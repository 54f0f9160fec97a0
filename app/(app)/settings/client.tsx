"use client";

import { useActionState } from "react";
import { Button } from "@/components/ui/button";
import { Card, Notice } from "@/components/ui/card";
import { Field, Input } from "@/components/ui/input";
import { changePassword, signOutEverywhere, updateProfile, type FormState } from "./actions";

export function SettingsForms({ name }: { name: string }) {
  const [profile, profileAction, profilePending] = useActionState(updateProfile, {} as FormState);
  const [pw, pwAction, pwPending] = useActionState(changePassword, {} as FormState);
  const [everywhere, everywhereAction, everywherePending] = useActionState(async () => {
    const r = await signOutEverywhere();
    window.location.href = "/signin";
    return r;
  }, {} as FormState);
  return (
    <div className="flex flex-col gap-6">
      <Card>
        <form action={profileAction} className="flex flex-col gap-4">
          <h2 className="font-bold">Profile</h2>
          <Field label="Name" htmlFor="name" error={profile.fieldErrors?.name}>
            <Input id="name" name="name" defaultValue={name} aria-invalid={!!profile.fieldErrors?.name} />
          </Field>
          {profile.ok ? <Notice tone="ok">{profile.ok}</Notice> : null}
          <Button type="submit" disabled={profilePending}>
            Save
          </Button>
        </form>
      </Card>
      <Card>
        <form action={pwAction} className="flex flex-col gap-4">
          <h2 className="font-bold">Password</h2>
          <Field label="Current password" htmlFor="current" error={pw.fieldErrors?.current}>
            <Input id="current" name="current" type="password" autoComplete="current-password" />
          </Field>
          <Field label="New password" htmlFor="next" error={pw.fieldErrors?.next} hint="At least 10 characters.">
            <Input id="next" name="next" type="password" autoComplete="new-password" />
          </Field>
          <Field label="New password again" htmlFor="confirm" error={pw.fieldErrors?.confirm}>
            <Input id="confirm" name="confirm" type="password" autoComplete="new-password" />
          </Field>
          {pw.ok ? <Notice tone="ok">{pw.ok}</Notice> : null}
          <Button type="submit" disabled={pwPending}>
            Change password
          </Button>
        </form>
      </Card>
      <Card>
        <form action={everywhereAction} className="flex flex-col gap-3">
          <h2 className="font-bold">Sessions</h2>
          <p className="text-sm text-muted">Signs this account out on every device, this one included.</p>
          {everywhere.ok ? <Notice tone="ok">{everywhere.ok}</Notice> : null}
          <Button type="submit" variant="secondary" disabled={everywherePending}>
            Sign out everywhere
          </Button>
        </form>
      </Card>
    </div>
  );
}
