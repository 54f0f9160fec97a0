import Link from "next/link";
import { notFound } from "next/navigation";
import { Card, EmptyState, PageHeader } from "@/components/ui/card";
import { RULE_KIND_ORDER, RULE_LABELS } from "@/lib/alerts/rules";
import { listKeptSites, listRules } from "@/lib/alerts/service";
import { pageContext } from "@/lib/auth/guard";
import { AppError } from "@/lib/errors";
import { CreateDefaultsForm, RuleForm } from "./client";

export const metadata = { title: "Alert rules" };

type Search = Promise<Record<string, string | string[] | undefined>>;

export default async function AlertRulesPage({ searchParams }: { searchParams: Search }) {
  const ctx = await pageContext(["steward"], "/alerts/rules");
  const sp = await searchParams;
  const slug = (Array.isArray(sp.site) ? sp.site[0] : sp.site) || undefined;
  const kept = await listKeptSites({ ctx });
  if (!slug) {
    return (
      <div className="max-w-3xl">
        <PageHeader title="Alert rules" lead="Choose a site to see and change its rules." />
        {kept.length === 0 ? (
          <EmptyState title="You keep no sites yet">
            An admin adds you as a steward of a site.
          </EmptyState>
        ) : (
          <ul className="grid gap-2">
            {kept.map((s) => (
              <li key={s.slug}>
                <Link
                  className="border-line bg-surface hover:bg-raised flex min-h-11 items-center rounded-lg border px-4 font-bold"
                  href={`/alerts/rules?site=${encodeURIComponent(s.slug)}`}
                >
                  {s.name}
                </Link>
              </li>
            ))}
          </ul>
        )}
      </div>
    );
  }
  const data = await listRules({ ctx, input: { slug } }).catch((err) => {
    if (err instanceof AppError && err.status === 404) notFound();
    throw err;
  });
  const missing = RULE_KIND_ORDER.filter((k) => !data.rules.some((r) => r.kind === k));
  return (
    <div className="max-w-3xl">
      <PageHeader
        title={`Alert rules: ${data.site.name}`}
        lead={`Target darkness ${data.site.targetMag.toFixed(2)} mag/arcsec² (set on the site). Changes are recorded in the audit log and used from the next evaluation.`}
        actions={
          <Link
            href={`/alerts?site=${encodeURIComponent(data.site.slug)}`}
            className="border-line bg-raised hover:bg-line inline-flex min-h-11 items-center rounded-lg border px-4 text-sm font-bold"
          >
            This site's alerts
          </Link>
        }
      />
      {kept.length > 1 ? (
        <nav aria-label="Other sites" className="mb-4 flex flex-wrap gap-2 text-sm">
          {kept.map((s) => (
            <Link
              key={s.slug}
              href={`/alerts/rules?site=${encodeURIComponent(s.slug)}`}
              aria-current={s.slug === data.site.slug ? "page" : undefined}
              className="hover:bg-raised aria-[current=page]:bg-raised flex min-h-11 items-center rounded-lg px-3 aria-[current=page]:font-bold"
            >
              {s.name}
            </Link>
          ))}
        </nav>
      ) : null}
      {data.rules.length === 0 ? (
        <EmptyState title="No rules yet">
          <p className="mb-3">
            The first evaluation adds the default rules; you can add them now instead.
          </p>
          <CreateDefaultsForm slug={data.site.slug} label="Add the default rules" />
        </EmptyState>
      ) : (
        <ul className="grid gap-4">
          {data.rules.map((r) => (
            <li key={r.id}>
              <Card>
                <h2 className="mb-1 text-lg font-bold">{RULE_LABELS[r.kind].title}</h2>
                <p className="text-muted mb-3 text-xs">
                  {r.updatedByName ? `Last changed by ${r.updatedByName}, ` : "Default rule, "}
                  {r.updatedAt.toISOString().slice(0, 10)}
                  {r.lastEvaluatedAt
                    ? ` · last evaluated ${r.lastEvaluatedAt.toISOString().slice(0, 16).replace("T", " ")} UTC`
                    : " · not evaluated yet"}
                </p>
                <RuleForm
                  rule={{
                    id: r.id,
                    kind: r.kind,
                    enabled: r.enabled,
                    params: r.params as Record<string, unknown>,
                  }}
                  title={RULE_LABELS[r.kind].title}
                  description={RULE_LABELS[r.kind].describe(r.params as never)}
                />
              </Card>
            </li>
          ))}
        </ul>
      )}
      {data.rules.length > 0 && missing.length > 0 ? (
        <div className="mt-6">
          <CreateDefaultsForm
            slug={data.site.slug}
            label={`Add the missing default rules (${missing.length})`}
          />
        </div>
      ) : null}
    </div>
  );
}
