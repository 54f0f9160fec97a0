import Link from "next/link";
import { Suspense } from "react";
import { ALERT_RULE_KINDS, type AlertRuleKind } from "@/db/schema";
import { Button } from "@/components/ui/button";
import { Card, EmptyState, Notice, PageHeader } from "@/components/ui/card";
import { Field, Select } from "@/components/ui/input";
import { RULE_LABELS } from "@/lib/alerts/rules";
import { listAlerts, listKeptSites, type AlertListItem } from "@/lib/alerts/service";
import { pageContext } from "@/lib/auth/guard";
import { cn } from "@/lib/cn";
import { AlertActions } from "./client";

export const metadata = { title: "Alerts" };

const TABS = [
  { status: "open", label: "Open" },
  { status: "acknowledged", label: "Acknowledged" },
  { status: "resolved", label: "Resolved" },
] as const;

type Search = Promise<Record<string, string | string[] | undefined>>;
const one = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v) || undefined;
const when = (d: Date | null) =>
  d ? `${d.toISOString().slice(0, 16).replace("T", " ")} UTC` : "—";

function MailStatus({ mail }: { mail: AlertListItem["mail"] }) {
  if (mail.length === 0) return <span className="text-muted">no e-mail for this alert</span>;
  return (
    <ul className="flex flex-col gap-1">
      {mail.map((m, i) => (
        <li key={i} className="break-all">
          {m.recipient}:{" "}
          <span
            className={cn(
              "font-bold",
              m.status === "sent" ? "text-ok" : m.status === "failed" ? "text-danger" : "text-warn",
            )}
          >
            {m.status}
          </span>
          {m.attempts > 1 ? ` after ${m.attempts} attempts` : ""}
          {m.status === "failed" && m.lastError ? (
            <span className="text-muted"> — {m.lastError} (retrying)</span>
          ) : null}
        </li>
      ))}
    </ul>
  );
}

export default async function AlertsPage({ searchParams }: { searchParams: Search }) {
  const ctx = await pageContext(["steward"], "/alerts");
  const sp = await searchParams;
  const statusParam = one(sp.status);
  const status = TABS.some((t) => t.status === statusParam)
    ? (statusParam as (typeof TABS)[number]["status"])
    : "open";
  const kindParam = one(sp.kind);
  const kind = (ALERT_RULE_KINDS as readonly string[]).includes(kindParam ?? "")
    ? (kindParam as AlertRuleKind)
    : undefined;
  const siteSlug = one(sp.site);
  const kept = await listKeptSites({ ctx });
  const query = (s: string) => {
    const q = new URLSearchParams({ status: s });
    if (siteSlug) q.set("site", siteSlug);
    if (kind) q.set("kind", kind);
    return `/alerts?${q}`;
  };

  return (
    <div>
      <PageHeader
        title="Alerts"
        lead="Conditions your sites' rules found in the nightly values. Each condition is one alert: later evaluations update it, and it clears by itself after its rule's run of nights without the condition."
        actions={
          kept.length > 0 ? (
            <Link
              href={`/alerts/rules?site=${encodeURIComponent(siteSlug ?? kept[0]!.slug)}`}
              className="border-line bg-raised hover:bg-line inline-flex min-h-11 items-center rounded-lg border px-4 text-sm font-bold"
            >
              Alert rules
            </Link>
          ) : null
        }
      />
      <nav aria-label="Alert status" className="border-line mb-4 flex flex-wrap gap-1 border-b">
        {TABS.map((t) => (
          <Link
            key={t.status}
            href={query(t.status)}
            aria-current={t.status === status ? "page" : undefined}
            className={cn(
              "flex min-h-11 items-center rounded-t-lg px-4 text-sm font-bold",
              t.status === status
                ? "border-accent text-fg border-b-2"
                : "text-muted hover:bg-raised",
            )}
          >
            {t.label}
          </Link>
        ))}
      </nav>
      <form
        method="get"
        action="/alerts"
        className="mb-6 grid gap-3 sm:grid-cols-[1fr_1fr_auto] sm:items-end"
        aria-label="Filter alerts"
      >
        <input type="hidden" name="status" value={status} />
        <Field label="Site" htmlFor="filter-site">
          <Select id="filter-site" name="site" defaultValue={siteSlug ?? ""}>
            <option value="">All my sites</option>
            {kept.map((s) => (
              <option key={s.slug} value={s.slug}>
                {s.name}
              </option>
            ))}
          </Select>
        </Field>
        <Field label="Kind" htmlFor="filter-kind">
          <Select id="filter-kind" name="kind" defaultValue={kind ?? ""}>
            <option value="">All kinds</option>
            {ALERT_RULE_KINDS.map((k) => (
              <option key={k} value={k}>
                {RULE_LABELS[k].title}
              </option>
            ))}
          </Select>
        </Field>
        <Button type="submit" variant="secondary">
          Filter
        </Button>
      </form>

      {kept.length === 0 ? (
        <EmptyState title="You keep no sites yet">
          An admin adds you as a steward of a site; its alerts then appear here.
        </EmptyState>
      ) : (
        <Suspense key={`${status}|${siteSlug ?? ""}|${kind ?? ""}`} fallback={<ListSkeleton />}>
          <AlertList ctx={ctx} status={status} siteSlug={siteSlug} kind={kind} />
        </Suspense>
      )}
    </div>
  );
}

function ListSkeleton() {
  return (
    <div role="status" aria-live="polite" className="grid animate-pulse gap-4">
      <span className="sr-only">Loading alerts…</span>
      <div className="rounded-card bg-surface h-40" />
      <div className="rounded-card bg-surface h-40" />
    </div>
  );
}

async function AlertList({
  ctx,
  status,
  siteSlug,
  kind,
}: {
  ctx: Awaited<ReturnType<typeof pageContext>>;
  status: "open" | "acknowledged" | "resolved";
  siteSlug?: string;
  kind?: AlertRuleKind;
}) {
  const rows = await listAlerts({ ctx, input: { status, site: siteSlug, kind } });
  return rows.length === 0 ? (
    <EmptyState title={`No ${status} alerts`}>
      {status === "open"
        ? "Nothing needs your attention. Alerts are evaluated after each night's summaries and once a day."
        : "Nothing here for these filters."}
    </EmptyState>
  ) : (
    <ul className="grid gap-4" aria-label={`${rows.length} ${status} alerts`}>
      {rows.map((a) => {
        const label = `${RULE_LABELS[a.kind].title} at ${a.site.name}${a.stationName ? `, ${a.stationName}` : ""}`;
        const failed = a.mail.some((m) => m.status === "failed");
        return (
          <li key={a.id}>
            <Card aria-label={label}>
              <div className="flex flex-wrap items-baseline justify-between gap-2">
                <h2 className="text-lg font-bold">{label}</h2>
                <Link
                  href={`/sites/${a.site.slug}`}
                  className="text-accent min-h-11 content-center text-sm underline"
                >
                  Site page
                </Link>
              </div>
              <p className="mt-2">{a.summary}</p>
              {failed ? (
                <div className="mt-3">
                  <Notice tone="warn" title="An e-mail for this alert has not gone out yet">
                    The mail server refused it; it is retried with increasing delays.
                  </Notice>
                </div>
              ) : null}
              <dl className="mt-3 grid grid-cols-1 gap-x-4 gap-y-1 text-sm sm:grid-cols-[auto_1fr]">
                <dt className="text-muted">Opened</dt>
                <dd>{when(a.openedAt)}</dd>
                <dt className="text-muted">Last seen</dt>
                <dd>
                  {when(a.lastSeenAt)}
                  {a.clearCount > 0 && a.status !== "resolved"
                    ? ` · ${a.clearCount} night${a.clearCount === 1 ? "" : "s"} without the condition so far`
                    : ""}
                </dd>
                {a.acknowledgedAt ? (
                  <>
                    <dt className="text-muted">Acknowledged</dt>
                    <dd>
                      {when(a.acknowledgedAt)} by {a.acknowledgedByName ?? "someone since removed"}
                    </dd>
                  </>
                ) : null}
                {a.resolvedAt ? (
                  <>
                    <dt className="text-muted">Resolved</dt>
                    <dd>
                      {when(a.resolvedAt)}{" "}
                      {a.resolvedByName ? `by ${a.resolvedByName}` : "(cleared by itself)"}
                    </dd>
                  </>
                ) : null}
                {a.note ? (
                  <>
                    <dt className="text-muted">Note</dt>
                    <dd className="whitespace-pre-line">{a.note}</dd>
                  </>
                ) : null}
                <dt className="text-muted">E-mail</dt>
                <dd>
                  <MailStatus mail={a.mail} />
                </dd>
              </dl>
              {a.status !== "resolved" ? (
                <AlertActions alertId={a.id} status={a.status} label={label} />
              ) : null}
            </Card>
          </li>
        );
      })}
    </ul>
  );
}
