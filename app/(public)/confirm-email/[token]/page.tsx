import { LinkProblemNotice } from "@/components/account/link-problem";
import { getDb } from "@/db";
import { inspectEmailChange } from "@/lib/people/email-change";
import { ConfirmEmailForm } from "./client";

export const metadata = { title: "Confirm your new e-mail address" };
export const dynamic = "force-dynamic";

export default async function ConfirmEmailPage({ params }: { params: Promise<{ token: string }> }) {
  const token = decodeURIComponent((await params).token);
  const view = await inspectEmailChange(getDb(), token);
  if (!view.ok) return <LinkProblemNotice problem={view.problem} again={{ href: "/settings", label: "Try again from settings" }} />;
  return (
    <div className="mx-auto flex max-w-md flex-col gap-4">
      <h1 className="text-2xl font-bold">Confirm your new e-mail address</h1>
      <p className="text-muted">
        Your Nightmark account will use <strong className="break-all text-fg">{view.newEmail}</strong> for sign-in and e-mails.
      </p>
      <ConfirmEmailForm token={token} />
    </div>
  );
}
