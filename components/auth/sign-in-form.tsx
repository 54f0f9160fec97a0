"use client";

import { signIn } from "next-auth/react";
import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { Field, Input } from "@/components/ui/input";

export type SignInFormProps = { callbackUrl: string; initialError?: string; messages: Record<string, string> };

export function SignInForm({ callbackUrl, initialError, messages }: SignInFormProps) {
  const router = useRouter();
  const [error, setError] = useState(initialError);
  const [info, setInfo] = useState<string>();
  const [busy, setBusy] = useState<"password" | "email" | null>(null);

  async function onPassword(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    setBusy("password");
    setError(undefined);
    const res = await signIn("password", {
      email: String(form.get("email")),
      password: String(form.get("password")),
      redirect: false,
      callbackUrl,
    });
    setBusy(null);
    if (!res || res.error) {
      setError(messages[res?.error ?? "Default"] ?? messages.Default);
      return;
    }
    router.push(callbackUrl);
    router.refresh();
  }

  async function onLink(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    setBusy("email");
    setError(undefined);
    const res = await signIn("email", { email: String(form.get("email")), redirect: false, callbackUrl });
    setBusy(null);
    if (!res || res.error) {
      setError(messages[res?.error ?? "EmailSignin"] ?? messages.EmailSignin);
      return;
    }
    const err = res.url ? new URL(res.url, location.href).searchParams.get("error") : null;
    if (err) {
      setError(messages[err] ?? messages.Default);
      return;
    }
    setInfo("Check your e-mail: a sign-in link is on its way. It works once, for 15 minutes.");
  }

  return (
    <div className="mt-6 flex flex-col gap-6">
      {error ? <Notice tone="danger">{error}</Notice> : null}
      {info ? <Notice tone="ok">{info}</Notice> : null}
      <form onSubmit={onPassword} className="flex flex-col gap-4 rounded-card border border-line bg-surface p-4" aria-labelledby="pw-title">
        <h2 id="pw-title" className="font-bold">
          With your password
        </h2>
        <Field label="E-mail" htmlFor="email">
          <Input id="email" name="email" type="email" autoComplete="email" required />
        </Field>
        <Field label="Password" htmlFor="password">
          <Input id="password" name="password" type="password" autoComplete="current-password" required />
        </Field>
        <Button type="submit" disabled={busy !== null}>
          {busy === "password" ? "Signing in…" : "Sign in"}
        </Button>
        <a href="/reset" className="text-sm text-accent underline">
          Forgot your password?
        </a>
      </form>
      <form onSubmit={onLink} className="flex flex-col gap-4 rounded-card border border-line bg-surface p-4" aria-labelledby="link-title">
        <h2 id="link-title" className="font-bold">
          With a link by e-mail
        </h2>
        <Field label="E-mail" htmlFor="link-email">
          <Input id="link-email" name="email" type="email" autoComplete="email" required />
        </Field>
        <Button type="submit" variant="secondary" disabled={busy !== null}>
          {busy === "email" ? "Sending…" : "E-mail me a sign-in link"}
        </Button>
      </form>
    </div>
  );
}
