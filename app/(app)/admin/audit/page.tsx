import Link from "next/link";
import { AdminNav, Pager, qs } from "@/components/admin/admin-nav";
import { Button, buttonVariants } from "@/components/ui/button";
import { Card, EmptyState, Notice, PageHeader } from "@/components/ui/card";
import { Field, Input, Select } from "@/components/ui/input";
import { pageContext } from "@/lib/auth/guard";
import { AUDIT_ENTITY_TYPES, distinctAuditActions, queryAuditLog } from "@/lib/people/audit-log";
import { auditQuerySchema } from "@/lib/people/schemas";

export const metadata = { title: "Audit log" };

const short = (v: unknown) => (v === null || v === undefined ? "—" : JSON.stringify(v));

export default async function AuditPage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  const ctx = await pageContext(["admin"], "/admin/audit");
  const parsed = auditQuerySchema.safeParse(await searchParams);
  const query = parsed.success ? parsed.data : auditQuerySchema.parse({});
  const [log, actions] = await Promise.all([queryAuditLog({ ctx, input: query }), distinctAuditActions({ ctx })]);
  const filters = { actor: query.actor, entityType: query.entityType, action: query.action, from: query.from, to: query.to };
  return (
    <div>
      <PageHeader
        title="Audit log"
        lead="Every change to roles, sites' stewards, stations, tokens, alert rules and calibration, with what it was before and after."
        actions={
          <a href={`/api/v1/admin/audit.csv${qs(filters)}`} className={buttonVariants({ variant: "secondary" })} download>
            Export CSV
          </a>
        }
      />
      <AdminNav current="/admin/audit" />
      {!parsed.success ? <Notice tone="warn">Some filters were not understood and were ignored.</Notice> : null}
      <Card className="mb-6">
        <form method="get" aria-label="Filter the audit log" className="grid gap-3 sm:grid-cols-2 lg:grid-cols-6 lg:items-end">
          <Field label="Actor (name or e-mail)" htmlFor="actor">
            <Input id="actor" name="actor" defaultValue={query.actor} />
          </Field>
          <Field label="Entity type" htmlFor="entityType">
            <Select id="entityType" name="entityType" defaultValue={query.entityType}>
              <option value="">Any</option>
              {AUDIT_ENTITY_TYPES.map((t) => (
                <option key={t}>{t}</option>
              ))}
            </Select>
          </Field>
          <Field label="Action" htmlFor="action">
            <Input id="action" name="action" list="audit-actions" defaultValue={query.action} />
            <datalist id="audit-actions">
              {actions.map((a) => (
                <option key={a} value={a} />
              ))}
            </datalist>
          </Field>
          <Field label="From (UTC date)" htmlFor="from">
            <Input id="from" name="from" type="date" defaultValue={query.from} />
          </Field>
          <Field label="To (UTC date)" htmlFor="to">
            <Input id="to" name="to" type="date" defaultValue={query.to} />
          </Field>
          <Button type="submit" variant="secondary">
            Filter
          </Button>
        </form>
      </Card>
      {log.rows.length === 0 ? (
        <EmptyState title="No entries match">
          <Link href="/admin/audit" className="text-accent underline">
            Clear the filters
          </Link>
        </EmptyState>
      ) : (
        <div className="overflow-x-auto rounded-card border border-line">
          <table className="w-full min-w-[48rem] text-left text-sm">
            <caption className="sr-only">Audit entries, newest first, {log.total} in all</caption>
            <thead className="bg-surface text-muted">
              <tr>
                <th scope="col" className="p-3">When (UTC)</th>
                <th scope="col" className="p-3">Who</th>
                <th scope="col" className="p-3">What</th>
                <th scope="col" className="p-3">Before</th>
                <th scope="col" className="p-3">After</th>
              </tr>
            </thead>
            <tbody>
              {log.rows.map((r) => (
                <tr key={r.id} className="border-t border-line align-top">
                  <td className="whitespace-nowrap p-3 font-mono text-xs">{r.at.toISOString().slice(0, 19).replace("T", " ")}</td>
                  <td className="p-3">{r.actorName ?? r.actorEmail ?? "system"}</td>
                  <td className="p-3">
                    <span className="font-bold">{r.action}</span>
                    <span className="block font-mono text-xs text-muted">
                      {r.entityType} {r.entityId}
                    </span>
                  </td>
                  <td className="max-w-xs break-all p-3 font-mono text-xs">{short(r.before)}</td>
                  <td className="max-w-xs break-all p-3 font-mono text-xs">{short(r.after)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <Pager page={log.page} pageSize={log.pageSize} total={log.total} href={(p) => `/admin/audit${qs({ ...filters, page: p })}`} />
    </div>
  );
}
