import Link from "next/link";
import { AdminNav, Pager, qs } from "@/components/admin/admin-nav";
import { Button } from "@/components/ui/button";
import { Card, EmptyState, PageHeader } from "@/components/ui/card";
import { Field, Input, Select } from "@/components/ui/input";
import { pageContext } from "@/lib/auth/guard";
import { stationSearchSchema } from "@/lib/people/schemas";
import { listStationsForAdmin } from "@/lib/people/stations-admin";
import { StationRowActions } from "./client";

export const metadata = { title: "Stations (admin)" };

export default async function AdminStationsPage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  const ctx = await pageContext(["admin"], "/admin/stations");
  const parsed = stationSearchSchema.safeParse(await searchParams);
  const query = parsed.success ? parsed.data : stationSearchSchema.parse({});
  const list = await listStationsForAdmin({ ctx, input: query });
  return (
    <div>
      <PageHeader title="Stations" lead="Retire a station that no longer reports, or hand it to another volunteer." />
      <AdminNav current="/admin/stations" />
      <Card className="mb-6">
        <form method="get" role="search" aria-label="Search stations" className="grid gap-3 sm:grid-cols-[1fr_auto_auto] sm:items-end">
          <Field label="Station, site or owner" htmlFor="q">
            <Input id="q" name="q" type="search" defaultValue={query.q} />
          </Field>
          <Field label="Status" htmlFor="status">
            <Select id="status" name="status" defaultValue={query.status}>
              <option value="">Any status</option>
              <option value="active">active</option>
              <option value="retired">retired</option>
            </Select>
          </Field>
          <Button type="submit" variant="secondary">
            Search
          </Button>
        </form>
      </Card>
      {list.rows.length === 0 ? (
        <EmptyState title="No stations match">
          <Link href="/admin/stations" className="text-accent underline">
            Clear the search
          </Link>
        </EmptyState>
      ) : (
        <div className="overflow-x-auto rounded-card border border-line">
          <table className="w-full min-w-[44rem] text-left text-sm">
            <caption className="sr-only">Stations, {list.total} in all</caption>
            <thead className="bg-surface text-muted">
              <tr>
                <th scope="col" className="p-3">Station</th>
                <th scope="col" className="p-3">Site · approval</th>
                <th scope="col" className="p-3">Owner</th>
                <th scope="col" className="p-3">Change</th>
              </tr>
            </thead>
            <tbody>
              {list.rows.map((s) => (
                <tr key={s.id} className="border-t border-line align-top">
                  <td className="p-3">
                    <span className="font-bold">{s.name}</span>
                    <span className="block text-muted">
                      {s.slug} · {s.status}
                    </span>
                  </td>
                  <td className="p-3">
                    {s.siteName ?? "—"}
                    {s.siteName ? <span className="block text-muted">{s.approval}</span> : null}
                  </td>
                  <td className="p-3">
                    {s.ownerName ?? "—"}
                    <span className="block break-all text-muted">{s.ownerEmail}</span>
                  </td>
                  <td className="p-3">
                    <StationRowActions stationId={s.id} name={s.name} retired={s.status === "retired"} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <Pager page={list.page} pageSize={list.pageSize} total={list.total} href={(p) => `/admin/stations${qs({ ...query, page: p })}`} />
    </div>
  );
}
