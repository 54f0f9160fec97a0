import Link from "next/link";
import { AdminNav } from "@/components/admin/admin-nav";
import { Card, EmptyState, PageHeader } from "@/components/ui/card";
import { pageContext } from "@/lib/auth/guard";
import { listJoinRequests } from "@/lib/people/join-requests";
import { DecideJoinForm } from "./client";

export const metadata = { title: "Join requests" };

const TABS = ["pending", "approved", "declined"] as const;

export default async function JoinRequestsPage({ searchParams }: { searchParams: Promise<{ status?: string }> }) {
  const ctx = await pageContext(["admin"], "/admin/requests");
  const sp = await searchParams;
  const status = TABS.find((t) => t === sp.status) ?? "pending";
  const rows = await listJoinRequests({ ctx, input: { status } });
  return (
    <div>
      <PageHeader title="Join requests" lead="People who asked to join as volunteers. Approving e-mails them an invitation link; declining e-mails them a short note." />
      <AdminNav current="/admin/requests" />
      <ul className="mb-4 flex gap-2" aria-label="Show">
        {TABS.map((t) => (
          <li key={t}>
            <Link
              href={t === "pending" ? "/admin/requests" : `/admin/requests?status=${t}`}
              aria-current={t === status ? "page" : undefined}
              className={`flex min-h-11 items-center rounded-lg border px-3 text-sm font-bold ${t === status ? "border-accent text-accent" : "border-line"}`}
            >
              {t}
            </Link>
          </li>
        ))}
      </ul>
      {rows.length === 0 ? (
        <EmptyState title={status === "pending" ? "No requests waiting" : `No ${status} requests`}>The form is at /join.</EmptyState>
      ) : (
        <ul className="grid gap-4 md:grid-cols-2">
          {rows.map((r) => (
            <li key={r.id}>
              <Card>
                <h2 className="font-bold">{r.name}</h2>
                <p className="break-all text-sm text-muted">{r.email}</p>
                <p className="text-xs text-muted">Asked {r.createdAt.toISOString().slice(0, 16).replace("T", " ")} UTC</p>
                {r.message ? <blockquote className="my-3 border-l-2 border-line pl-3 text-sm">{r.message}</blockquote> : null}
                {r.status === "pending" ? <DecideJoinForm id={r.id} name={r.name} /> : <p className="mt-2 text-sm">{r.status}</p>}
              </Card>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
