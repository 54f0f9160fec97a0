import { LinkProblemNotice } from "@/components/account/link-problem";
import { getDb } from "@/db";
import { inspectInvitation } from "@/lib/people/invitations";
import { AcceptInviteForm } from "./client";

export const metadata = { title: "Accept your invitation" };
export const dynamic = "force-dynamic";

export default async function InvitePage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const view = await inspectInvitation(getDb(), decodeURIComponent(token));
  if (!view.ok) return <LinkProblemNotice problem={view.problem} again={{ href: "/join", label: "Ask to join" }} />;
  return (
    <div className="mx-auto flex max-w-md flex-col gap-4">
      <h1 className="text-2xl font-bold">Welcome to Nightmark</h1>
      <p className="text-muted">
        You are invited as a <strong className="text-fg">{view.role}</strong>
        {view.siteNames.length ? <> keeping {view.siteNames.join(", ")}</> : null}. Choose your name and a password.
      </p>
      <AcceptInviteForm token={decodeURIComponent(token)} email={view.email} />
    </div>
  );
}
