"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { useId, useState, type FormEvent } from "react";
import { Button, buttonVariants } from "@/components/ui/button";
import { Card, EmptyState, Notice } from "@/components/ui/card";
import { Field, Input } from "@/components/ui/input";
import type { BriefListItem } from "@/lib/briefs/service";
import { cn } from "@/lib/cn";
import { queryKeys } from "@/lib/query-keys";

type Site = { slug: string; name: string };
type Estimate = { id: string; name: string; createdAt: string };
type ApiError = { error?: { code: string; message: string; details?: { path: string; message: string }[] } };

async function api<T>(url: string, init?: RequestInit): Promise<T> {
  const res = await fetch(url, { cache: "no-store", ...init });
  const body = (await res.json().catch(() => ({}))) as T & ApiError;
  if (!res.ok) {
    const err = new Error(body.error?.message ?? `The server answered ${res.status}.`) as Error & { details?: { path: string; message: string }[] };
    err.details = body.error?.details;
    throw err;
  }
  return body;
}

const STATUS_WORDS: Record<BriefListItem["status"], string> = { queued: "Waiting for the renderer", rendering: "Rendering", done: "Ready", failed: "Failed" };

export function BriefsClient({ sites, estimates, defaults }: { sites: Site[]; estimates: Estimate[]; defaults: { from: string; to: string } }) {
  const qc = useQueryClient();
  const briefs = useQuery({
    queryKey: queryKeys.briefs(),
    queryFn: () => api<{ briefs: BriefListItem[] }>("/api/v1/briefs").then((b) => b.briefs),
    // Poll while something is being rendered.
    refetchInterval: (q) => (q.state.data?.some((b) => b.status === "queued" || b.status === "rendering") ? 1000 : false),
    staleTime: 0,
  });
  return (
    <div className="grid gap-6 lg:grid-cols-[minmax(0,2fr)_minmax(0,3fr)]">
      <Card aria-labelledby="new-brief-title">
        <h2 id="new-brief-title" className="mb-4 text-lg font-bold">
          Make a brief
        </h2>
        <BriefForm sites={sites} estimates={estimates} defaults={defaults} onCreated={() => qc.invalidateQueries({ queryKey: queryKeys.briefs() })} />
      </Card>
      <section aria-labelledby="my-briefs-title">
        <h2 id="my-briefs-title" className="mb-3 text-lg font-bold">
          My briefs
        </h2>
        {briefs.isPending ? (
          <p role="status" className="text-muted">
            Loading your briefs…
          </p>
        ) : briefs.isError ? (
          <Notice tone="danger" title="Your briefs could not be loaded">
            {briefs.error.message}{" "}
            <Button variant="secondary" size="sm" onClick={() => briefs.refetch()}>
              Try again
            </Button>
          </Notice>
        ) : briefs.data.length === 0 ? (
          <EmptyState title="No briefs yet">Choose a site and a period, then press “Make the brief”. It is rendered in the background; this list shows its progress.</EmptyState>
        ) : (
          <ul className="flex flex-col gap-3" data-testid="brief-list">
            {briefs.data.map((b) => (
              <BriefItem key={b.id} brief={b} />
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}

function BriefForm({ sites, estimates, defaults, onCreated }: { sites: Site[]; estimates: Estimate[]; defaults: { from: string; to: string }; onCreated: () => void }) {
  const [chosen, setChosen] = useState<string[]>(sites[0] ? [sites[0].slug] : []);
  const [from, setFrom] = useState(defaults.from);
  const [to, setTo] = useState(defaults.to);
  const [glow, setGlow] = useState<string[]>([]);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const create = useMutation({
    mutationFn: () => api<{ id: string }>("/api/v1/briefs", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ sites: chosen, from, to, glowEstimateIds: glow }) }),
    onSuccess: () => {
      setFieldErrors({});
      onCreated();
    },
    onError: (err: Error & { details?: { path: string; message: string }[] }) => {
      setFieldErrors(Object.fromEntries((err.details ?? []).map((d) => [d.path.split(".")[0] || "form", d.message])));
    },
  });
  const submit = (e: FormEvent) => {
    e.preventDefault();
    create.mutate();
  };
  const toggle = (list: string[], v: string) => (list.includes(v) ? list.filter((x) => x !== v) : [...list, v]);
  if (sites.length === 0) return <EmptyState title="No sites you can report on">Public sites and sites you steward appear here.</EmptyState>;
  return (
    <form onSubmit={submit} className="flex flex-col gap-4" noValidate>
      <fieldset className="flex flex-col gap-1" aria-describedby={fieldErrors.sites ? "brief-sites-error" : undefined}>
        <legend className="mb-1 text-sm font-bold">Sites</legend>
        {sites.map((s) => (
          <label key={s.slug} className="flex min-h-11 items-center gap-3">
            <input type="checkbox" className="h-5 w-5 accent-accent" checked={chosen.includes(s.slug)} onChange={() => setChosen(toggle(chosen, s.slug))} name="sites" value={s.slug} />
            {s.name}
          </label>
        ))}
        {fieldErrors.sites ? (
          <p id="brief-sites-error" role="alert" className="text-sm text-danger">
            {fieldErrors.sites}
          </p>
        ) : null}
      </fieldset>
      <div className="grid gap-4 sm:grid-cols-2">
        <Field label="From (night)" htmlFor="brief-from" error={fieldErrors.from} hint="Nights are named by their evening date.">
          <Input id="brief-from" type="date" value={from} onChange={(e) => setFrom(e.target.value)} required aria-invalid={!!fieldErrors.from} aria-describedby={fieldErrors.from ? "brief-from-error" : "brief-from-hint"} />
        </Field>
        <Field label="To (night)" htmlFor="brief-to" error={fieldErrors.to}>
          <Input id="brief-to" type="date" value={to} onChange={(e) => setTo(e.target.value)} required aria-invalid={!!fieldErrors.to} aria-describedby={fieldErrors.to ? "brief-to-error" : undefined} />
        </Field>
      </div>
      <fieldset className="flex flex-col gap-1">
        <legend className="mb-1 text-sm font-bold">Attach saved glow estimates (optional)</legend>
        {estimates.length === 0 ? (
          <p className="text-sm text-muted">
            None saved yet. Make one on the <a className="text-accent underline" href="/glow">glow estimate</a> page.
          </p>
        ) : (
          estimates.map((g) => (
            <label key={g.id} className="flex min-h-11 items-center gap-3">
              <input type="checkbox" className="h-5 w-5 accent-accent" checked={glow.includes(g.id)} onChange={() => setGlow(toggle(glow, g.id))} />
              {g.name} <span className="text-xs text-muted">saved {g.createdAt.slice(0, 10)}</span>
            </label>
          ))
        )}
      </fieldset>
      {create.isError && !Object.keys(fieldErrors).length ? <Notice tone="danger">{create.error.message}</Notice> : null}
      {create.isSuccess ? <Notice tone="ok">Queued. The list shows its progress.</Notice> : null}
      <Button type="submit" disabled={create.isPending || chosen.length === 0} className="self-start">
        {create.isPending ? "Queuing…" : "Make the brief"}
      </Button>
      <RawEvidence sites={sites.filter((s) => chosen.includes(s.slug))} from={from} to={to} />
    </form>
  );
}

function RawEvidence({ sites, from, to }: { sites: Site[]; from: string; to: string }) {
  if (!sites.length) return null;
  const q = (slug: string) => `site=${encodeURIComponent(slug)}&from=${from}&to=${to}`;
  return (
    <section aria-labelledby="raw-evidence-title" className="border-t border-line pt-4">
      <h3 id="raw-evidence-title" className="font-bold">
        Raw evidence
      </h3>
      <p className="mb-2 text-sm text-muted">The data behind a brief, for the same period: CSV with a header stating units, screening rules and time zone; positions as GeoJSON.</p>
      <ul className="flex flex-col gap-2 text-sm">
        {sites.map((s) => (
          <li key={s.slug} className="flex flex-wrap items-center gap-2">
            <span className="font-bold">{s.name}:</span>
            <a className={buttonVariants({ variant: "secondary", size: "sm" })} href={`/api/v1/exports/nights.csv?${q(s.slug)}`}>
              Night summaries (CSV)
            </a>
            <a className={buttonVariants({ variant: "secondary", size: "sm" })} href={`/api/v1/exports/readings.csv?${q(s.slug)}`}>
              Readings (CSV)
            </a>
            <a className={buttonVariants({ variant: "secondary", size: "sm" })} href={`/api/v1/exports/stations.geojson?site=${encodeURIComponent(s.slug)}`}>
              Stations (GeoJSON)
            </a>
            <a className={buttonVariants({ variant: "secondary", size: "sm" })} href={`/api/v1/exports/sites.geojson?site=${encodeURIComponent(s.slug)}`}>
              Boundary (GeoJSON)
            </a>
          </li>
        ))}
      </ul>
    </section>
  );
}

function BriefItem({ brief: b }: { brief: BriefListItem }) {
  const qc = useQueryClient();
  const labelId = useId();
  const [link, setLink] = useState<string | null>(null);
  const [copied, setCopied] = useState(false);
  const share = useMutation({
    mutationFn: () => api<{ id: string; url: string }>(`/api/v1/briefs/${b.id}/shares`, { method: "POST" }),
    onSuccess: (s) => {
      setLink(s.url);
      setCopied(false);
      void qc.invalidateQueries({ queryKey: queryKeys.briefs() });
    },
  });
  const revoke = useMutation({
    mutationFn: (shareId: string) => api(`/api/v1/briefs/${b.id}/shares/${shareId}`, { method: "DELETE" }),
    onSuccess: () => qc.invalidateQueries({ queryKey: queryKeys.briefs() }),
  });
  const busy = b.status === "queued" || b.status === "rendering";
  const active = b.shares.filter((s) => !s.revokedAt);
  return (
    <li>
      <Card className="flex flex-col gap-3" aria-labelledby={labelId} data-testid="brief-item" data-status={b.status}>
        <div className="flex flex-wrap items-baseline justify-between gap-2">
          <h3 id={labelId} className="font-bold">
            {b.sites.map((s) => s.name).join(", ")} · {b.from} to {b.to}
          </h3>
          <span className={cn("text-sm font-bold", b.status === "done" ? "text-ok" : b.status === "failed" ? "text-danger" : "text-muted")}>{STATUS_WORDS[b.status]}</span>
        </div>
        {busy ? (
          <div>
            <div
              role="progressbar"
              aria-labelledby={labelId}
              aria-valuemin={0}
              aria-valuemax={100}
              aria-valuenow={b.progress}
              aria-valuetext={`${STATUS_WORDS[b.status]}, ${b.progress} %`}
              className="h-3 w-full overflow-hidden rounded-full bg-raised"
            >
              <div className="h-full bg-accent transition-all" style={{ width: `${Math.max(4, b.progress)}%` }} />
            </div>
            <p className="mt-1 text-xs text-muted" aria-live="polite">
              {b.progress} %{b.error ? ` · ${b.error}` : ""}
            </p>
          </div>
        ) : null}
        {b.status === "failed" ? <Notice tone="danger">{b.error ?? "Rendering failed."} Make the brief again; if it fails again, tell an admin.</Notice> : null}
        {b.status === "done" ? (
          <>
            <p className="text-sm text-muted">
              Verification code{" "}
              <a className="font-mono font-bold text-fg underline" href={`/verify/${b.verificationCode}`}>
                {b.verificationCode}
              </a>{" "}
              · {b.sizeBytes ? `${Math.round(b.sizeBytes / 1024)} KB` : ""}
              {b.glowEstimates ? ` · ${b.glowEstimates} glow estimate(s) attached` : ""} · made {b.createdAt.replace("T", " ").slice(0, 16)} UTC
            </p>
            <div className="flex flex-wrap gap-2">
              <a className={buttonVariants({ variant: "primary" })} href={`/api/v1/briefs/${b.id}/pdf`} download data-testid="download-brief">
                Download PDF
              </a>
              <Button variant="secondary" onClick={() => share.mutate()} disabled={share.isPending}>
                {share.isPending ? "Making a link…" : "Make a share link"}
              </Button>
            </div>
            {share.isError ? <Notice tone="danger">{share.error.message}</Notice> : null}
            {link ? (
              <Notice tone="ok" title="Share link (shown only now: copy it)">
                <span className="break-all font-mono text-xs" data-testid="share-link">
                  {link}
                </span>{" "}
                <Button
                  size="sm"
                  variant="secondary"
                  onClick={() => {
                    void navigator.clipboard?.writeText(link).then(() => setCopied(true));
                  }}
                >
                  {copied ? "Copied" : "Copy"}
                </Button>
                <span className="block text-xs text-muted">Anyone with the link can download this PDF without an account, until you revoke it.</span>
              </Notice>
            ) : null}
            {active.length ? (
              <ul className="flex flex-col gap-1 text-sm">
                {active.map((s) => (
                  <li key={s.id} className="flex flex-wrap items-center gap-2">
                    Share link made {s.createdAt.replace("T", " ").slice(0, 16)} UTC
                    <Button size="sm" variant="danger" onClick={() => revoke.mutate(s.id)} disabled={revoke.isPending}>
                      Revoke
                    </Button>
                  </li>
                ))}
              </ul>
            ) : null}
            {revoke.isError ? <Notice tone="danger">{revoke.error.message}</Notice> : null}
          </>
        ) : null}
      </Card>
    </li>
  );
}
