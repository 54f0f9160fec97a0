import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { SignInForm } from "@/components/auth/sign-in-form";
import { currentUser } from "@/lib/auth/guard";
import { SIGN_IN_MESSAGES } from "@/lib/auth/options";

export const metadata: Metadata = { title: "Sign in" };

export default async function SignInPage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  const sp = await searchParams;
  const callbackUrl = sp.callbackUrl?.startsWith("/") ? sp.callbackUrl : "/dashboard";
  if (await currentUser()) redirect(callbackUrl);
  const error = sp.error ? (SIGN_IN_MESSAGES[sp.error] ?? SIGN_IN_MESSAGES.Default) : undefined;
  return (
    <div className="mx-auto max-w-md">
      <h1 className="text-2xl font-bold">Sign in to Nightmark</h1>
      <SignInForm callbackUrl={callbackUrl} initialError={error} messages={SIGN_IN_MESSAGES} />
    </div>
  );
}
