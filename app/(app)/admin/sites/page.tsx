import { AdminNav } from "@/components/admin/admin-nav";
import { Card, EmptyState, PageHeader } from "@/components/ui/card";
import { pageContext } from "@/lib/auth/guard";
import { listSitesWithStewards } from "@/lib/people/site-stewards";
import { AddStewardForm, RemoveStewardButton } from "./client";

export const metadata = { title: "Sites and stewards" };

export default async function AdminSitesPage() {
  const ctx = await pageContext(["admin"], "/admin/sites");
  const rows = await listSitesWithStewards({ ctx });
  return (
    <div>
      <PageHeader title="Sites and stewards" lead="Who keeps each site. Stewards approve stations inside their site and get its alerts." />
      <AdminNav current="/admin/sites" />
      {rows.length === 0 ? (
        <EmptyState title="No sites yet" />
      ) : (
        <ul className="grid gap-4 md:grid-cols-2">
          {rows.map((s) => (
            <li key={s.id}>
              <Card>
                <h2 className="font-bold">{s.name}</h2>
                <p className="text-xs text-muted">{s.isPublic ? "public" : "not public"} · {s.slug}</p>
                {s.stewards.length === 0 ? (
                  <p className="mt-3 text-sm text-warn">No steward: nobody can approve stations here.</p>
                ) : (
                  <ul className="mt-3 flex flex-col gap-1" aria-label={`Stewards of ${s.name}`}>
                    {s.stewards.map((p) => (
                      <li key={p.userId} className="flex flex-wrap items-center justify-between gap-2">
                        <span className="text-sm">
                          {p.name ?? p.email} <span className="break-all text-muted">{p.email}</span>
                          {p.status === "suspended" ? <span className="ml-1 text-danger">(suspended)</span> : null}
                        </span>
                        <RemoveStewardButton siteId={s.id} userId={p.userId} label={p.name ?? p.email} />
                      </li>
                    ))}
                  </ul>
                )}
                <AddStewardForm siteId={s.id} siteName={s.name} />
              </Card>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
