import { LinkProblemNotice } from "@/components/account/link-problem";
import { getDb } from "@/db";
import { inspectPasswordReset } from "@/lib/people/password-reset";
import { ResetPasswordForm } from "./client";

export const metadata = { title: "Choose a new password" };
export const dynamic = "force-dynamic";

export default async function ResetTokenPage({ params }: { params: Promise<{ token: string }> }) {
  const token = decodeURIComponent((await params).token);
  const view = await inspectPasswordReset(getDb(), token);
  if (!view.ok) return <LinkProblemNotice problem={view.problem} again={{ href: "/reset", label: "Ask for a new link" }} />;
  return (
    <div className="mx-auto flex max-w-md flex-col gap-4">
      <h1 className="text-2xl font-bold">Choose a new password</h1>
      <ResetPasswordForm token={token} />
    </div>
  );
}
