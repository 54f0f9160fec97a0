import { asc } from "drizzle-orm";
import Link from "next/link";
import { AdminNav, Pager, qs } from "@/components/admin/admin-nav";
import { Button } from "@/components/ui/button";
import { Card, EmptyState, PageHeader } from "@/components/ui/card";
import { Field, Input, Select } from "@/components/ui/input";
import { sites } from "@/db/schema";
import { pageContext } from "@/lib/auth/guard";
import { listOpenInvitations } from "@/lib/people/invitations";
import { listUsers } from "@/lib/people/users";
import { userSearchSchema } from "@/lib/people/schemas";
import { InviteForm, UserRowActions } from "./client";

export const metadata = { title: "People" };

export default async function AdminUsersPage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  const ctx = await pageContext(["admin"], "/admin/users");
  const parsed = userSearchSchema.safeParse(await searchParams);
  const query = parsed.success ? parsed.data : userSearchSchema.parse({});
  const [list, invites, allSites] = await Promise.all([
    listUsers({ ctx, input: query }),
    listOpenInvitations({ ctx }),
    ctx.db.select({ id: sites.id, name: sites.name }).from(sites).orderBy(asc(sites.name)),
  ]);
  return (
    <div>
      <PageHeader title="People and permissions" lead="Invite people, give roles, suspend accounts. Every change is in the audit log." />
      <AdminNav current="/admin/users" />
      <div className="flex flex-col gap-6">
        <Card>
          <InviteForm sites={allSites} />
          {invites.length ? (
            <details className="mt-4">
              <summary className="min-h-11 cursor-pointer py-2 text-sm font-bold">Open invitations ({invites.length})</summary>
              <ul className="mt-2 flex flex-col gap-1 text-sm">
                {invites.map((i) => (
                  <li key={i.id}>
                    {i.email} · {i.role} · until {i.expiresAt.toISOString().slice(0, 10)}
                  </li>
                ))}
              </ul>
            </details>
          ) : null}
        </Card>
        <Card>
          <form method="get" role="search" aria-label="Search people" className="grid gap-3 sm:grid-cols-[1fr_auto_auto_auto] sm:items-end">
            <Field label="Name or e-mail" htmlFor="q">
              <Input id="q" name="q" type="search" defaultValue={query.q} />
            </Field>
            <Field label="Role" htmlFor="role">
              <Select id="role" name="role" defaultValue={query.role}>
                <option value="">Any role</option>
                {["volunteer", "steward", "advocate", "admin"].map((r) => (
                  <option key={r}>{r}</option>
                ))}
              </Select>
            </Field>
            <Field label="Status" htmlFor="status">
              <Select id="status" name="status" defaultValue={query.status}>
                <option value="">Any status</option>
                <option value="active">active</option>
                <option value="suspended">suspended</option>
              </Select>
            </Field>
            <Button type="submit" variant="secondary">
              Search
            </Button>
          </form>
        </Card>
        {list.rows.length === 0 ? (
          <EmptyState title="Nobody matches">
            <Link href="/admin/users" className="text-accent underline">
              Clear the search
            </Link>
          </EmptyState>
        ) : (
          <div className="overflow-x-auto rounded-card border border-line">
            <table className="w-full min-w-[44rem] text-left text-sm">
              <caption className="sr-only">People, {list.total} in all</caption>
              <thead className="bg-surface text-muted">
                <tr>
                  <th scope="col" className="p-3">Person</th>
                  <th scope="col" className="p-3">Role · status</th>
                  <th scope="col" className="p-3">Stations · sites</th>
                  <th scope="col" className="p-3">Change</th>
                </tr>
              </thead>
              <tbody>
                {list.rows.map((u) => (
                  <tr key={u.id} className="border-t border-line align-top">
                    <td className="p-3">
                      <span className="font-bold">{u.name ?? "—"}</span>
                      <span className="block break-all text-muted">{u.email}</span>
                    </td>
                    <td className="p-3">
                      {u.role}
                      {u.status === "suspended" ? <span className="ml-2 rounded bg-danger/15 px-2 py-0.5 text-danger">suspended</span> : null}
                    </td>
                    <td className="p-3">
                      {u.stations} station{u.stations === 1 ? "" : "s"}
                      {u.sites.length ? <span className="block text-muted">keeps {u.sites.join(", ")}</span> : null}
                    </td>
                    <td className="p-3">
                      <UserRowActions userId={u.id} role={u.role} status={u.status} self={u.id === ctx.user.id} />
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
        <Pager page={list.page} pageSize={list.pageSize} total={list.total} href={(p) => `/admin/users${qs({ ...query, page: p })}`} />
      </div>
    </div>
  );
}
