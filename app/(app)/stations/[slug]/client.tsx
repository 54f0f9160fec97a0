"use client";

import { useQuery } from "@tanstack/react-query";
import { DateTime } from "luxon";
import dynamic from "next/dynamic";
import { useActionState, useId, useMemo, useRef, useState } from "react";
import { Button } from "@/components/ui/button";
import { Card, EmptyState, Notice } from "@/components/ui/card";
import { Field, Input } from "@/components/ui/input";
import { CATEGORY_STYLE, readingCategory, type CurveReading } from "@/components/stations/night-curve";
import { explainFlags, flagMask, formatSigned, type FlagName } from "@/lib/flags";
import type { FormState } from "@/lib/people/form-state";
import { queryKeys } from "@/lib/query-keys";
import type { StationNight, StationReading } from "@/lib/stations/readings";
import { addCalibrationAction, createTokenAction, revokeTokenAction, type CreatedToken } from "./actions";

const NightCurve = dynamic(() => import("@/components/stations/night-curve").then((m) => m.NightCurve), {
  ssr: false,
  loading: () => <p className="flex h-80 items-center justify-center text-muted" aria-busy="true">Loading the chart…</p>,
});

type Thresholds = { sunMaxAltDeg: number; moonMaxAltDeg: number; cloudWindowMin: number; cloudSpreadMag: number };
type Calibration = { id: string; effectiveFrom: string; offsetMag: number; note: string; createdAt: string; createdByName: string | null };
type Token = { id: string; name: string; prefix: string; createdAt: string; lastUsedAt: string | null; revokedAt: string | null };

export type StationClientProps = {
  station: { slug: string; name: string; timeZone: string; retired: boolean };
  thresholds: Thresholds;
  initialNight: string;
  lastNight: string;
  firstNight: string | null;
  latestNight: string | null;
  canManage: boolean;
  calibrations: Calibration[];
  tokens: Token[];
  appUrl: string;
};

async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { cache: "no-store" });
  const body = await res.json().catch(() => null);
  if (!res.ok) throw new Error(body?.error?.message ?? `The request failed (HTTP ${res.status}).`);
  return body as T;
}

const addDays = (night: string, days: number) => new Date(Date.parse(`${night}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10);
const fmt = (v: number | null | undefined, d = 2) => (v === null || v === undefined ? "—" : v.toFixed(d));

export function StationClient(props: StationClientProps) {
  const [night, setNight] = useState(props.initialNight);
  const nightRef = useRef<HTMLElement>(null);
  return (
    <>
      <NightSection {...props} night={night} setNight={setNight} sectionRef={nightRef} />
      <NightsTable
        slug={props.station.slug}
        lastNight={props.lastNight}
        onPick={(n) => {
          setNight(n);
          nightRef.current?.scrollIntoView({ behavior: "smooth", block: "start" });
        }}
      />
      <Calibrations slug={props.station.slug} calibrations={props.calibrations} canManage={props.canManage} lastNight={props.lastNight} />
      {props.canManage ? <Tokens slug={props.station.slug} tokens={props.tokens} retired={props.station.retired} appUrl={props.appUrl} timeZone={props.station.timeZone} lastNight={props.lastNight} /> : null}
    </>
  );
}

// ── one night ────────────────────────────────────────────────────────────────────────────────

function NightSection({
  station,
  thresholds,
  night,
  setNight,
  lastNight,
  firstNight,
  latestNight,
  sectionRef,
}: StationClientProps & { night: string; setNight: (n: string) => void; sectionRef: React.RefObject<HTMLElement | null> }) {
  // The selection belongs to a night: picking another night clears it without an effect.
  const [selection, setSelection] = useState<{ night: string; i: number } | null>(null);
  const selected = selection?.night === night ? selection.i : null;
  const setSelected = (i: number) => setSelection({ night, i });
  const q = useQuery({
    queryKey: queryKeys.stationReadings(station.slug, { night }),
    queryFn: async () => {
      // Page through the night (a one-minute meter gives ~1,440 readings; one page holds 5,000).
      const all: StationReading[] = [];
      let cursor: string | null = null;
      do {
        const qs = new URLSearchParams({ from: night, to: night, limit: "5000" });
        if (cursor) qs.set("cursor", cursor);
        const body: { readings: StationReading[]; next: string | null } = await getJson(`/api/v1/stations/${station.slug}/readings?${qs}`);
        all.push(...body.readings);
        cursor = body.next;
      } while (cursor);
      return all;
    },
  });
  const readings = q.data ?? [];
  const sel = selected !== null ? readings[selected] : undefined;
  const local = (iso: string) => DateTime.fromISO(iso, { zone: station.timeZone }).toFormat("HH:mm");
  const dateId = useId();

  return (
    <Card>
      <section ref={sectionRef} aria-labelledby="night-heading">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <div>
            <h2 id="night-heading" className="text-lg font-bold">
              The night of {DateTime.fromISO(night).toFormat("cccc d LLLL yyyy")}
            </h2>
            <p className="text-sm text-muted">
              Local time in {station.timeZone}; a night runs from local noon to the next noon and is named by its evening.
            </p>
          </div>
          <div className="flex flex-wrap items-end gap-2">
            <Button variant="secondary" onClick={() => setNight(addDays(night, -1))} aria-label="Previous night">
              ← Earlier
            </Button>
            <Field label="Night" htmlFor={dateId}>
              <Input
                id={dateId}
                type="date"
                value={night}
                min={firstNight ?? undefined}
                max={lastNight > (latestNight ?? "") ? lastNight : (latestNight ?? lastNight)}
                onChange={(e) => e.target.value && setNight(e.target.value)}
                className="w-44"
              />
            </Field>
            <Button variant="secondary" onClick={() => setNight(addDays(night, 1))} disabled={night >= lastNight && night >= (latestNight ?? "")} aria-label="Next night">
              Later →
            </Button>
          </div>
        </div>

        <div className="mt-4">
          {q.isPending ? (
            <p className="flex h-80 items-center justify-center text-muted" aria-busy="true" role="status">
              Loading the night&apos;s readings…
            </p>
          ) : q.error ? (
            <Notice tone="danger" title="The readings did not load">
              {(q.error as Error).message} <Button size="sm" variant="secondary" onClick={() => void q.refetch()}>Try again</Button>
            </Notice>
          ) : readings.length === 0 ? (
            <EmptyState title="No readings this night">
              {latestNight && latestNight !== night ? (
                <>
                  The latest night with readings is {latestNight}.{" "}
                  <Button size="sm" variant="secondary" onClick={() => setNight(latestNight)}>
                    Show {latestNight}
                  </Button>
                </>
              ) : (
                "Once the meter sends readings, they appear here."
              )}
            </EmptyState>
          ) : (
            <>
              <NightCurve readings={readings as CurveReading[]} timeZone={station.timeZone} selected={selected} onSelect={setSelected} sunMaxAltDeg={thresholds.sunMaxAltDeg} />
              <p className="mt-2 text-xs text-muted">
                Higher on the chart is darker. Shaded: Sun (solid line) and Moon (dashed) altitude, right axis. Click a reading, or focus the chart and use the arrow keys, to see why it did or did not count.
              </p>
              <Explanation reading={sel} thresholds={thresholds} local={local} />
              <details className="mt-3">
                <summary className="min-h-11 cursor-pointer py-2 text-sm font-bold">The night&apos;s {readings.length} readings as a table</summary>
                <div className="max-h-96 overflow-auto">
                  <table className="w-full text-left text-sm">
                    <caption className="sr-only">Readings of the night of {night}</caption>
                    <thead className="sticky top-0 bg-surface text-muted">
                      <tr>
                        <th scope="col" className="py-1 pr-3">Local time</th>
                        <th scope="col" className="py-1 pr-3">mag/arcsec²</th>
                        <th scope="col" className="py-1 pr-3">Sun</th>
                        <th scope="col" className="py-1 pr-3">Moon</th>
                        <th scope="col" className="py-1 pr-3">Outcome</th>
                      </tr>
                    </thead>
                    <tbody>
                      {readings.map((r, i) => {
                        const c = CATEGORY_STYLE[readingCategory(r.flags as FlagName[])];
                        return (
                          <tr key={r.takenAt} className={i === selected ? "bg-raised" : undefined}>
                            <td className="py-1 pr-3">{local(r.takenAt)}</td>
                            <td className="py-1 pr-3 font-mono">{r.mag.toFixed(2)}</td>
                            <td className="py-1 pr-3">{formatSigned(r.sunAltDeg)}°</td>
                            <td className="py-1 pr-3">{formatSigned(r.moonAltDeg)}°</td>
                            <td className="py-1 pr-3">
                              <button type="button" className="min-h-9 text-accent underline" onClick={() => setSelected(i)}>
                                <span aria-hidden="true">{c.glyph} </span>
                                {c.label}
                              </button>
                            </td>
                          </tr>
                        );
                      })}
                    </tbody>
                  </table>
                </div>
              </details>
            </>
          )}
        </div>
      </section>
    </Card>
  );
}

function Explanation({ reading, thresholds, local }: { reading: StationReading | undefined; thresholds: Thresholds; local: (iso: string) => string }) {
  return (
    <div aria-live="polite" className="mt-3 min-h-16 rounded-lg border border-line bg-raised p-3 text-sm" data-testid="reading-explanation">
      {reading ? (
        <>
          <p className="font-bold">
            {local(reading.takenAt)} · {reading.mag.toFixed(2)} mag/arcsec² ·{" "}
            {reading.usable ? "counted" : `not counted (${reading.flags.join(", ")})`}
          </p>
          <ul className="mt-1 list-disc pl-5">
            {explainFlags(flagMask(reading.flags as FlagName[]), reading, thresholds).map((s) => (
              <li key={s}>{s}</li>
            ))}
          </ul>
        </>
      ) : (
        <p className="text-muted">Select a reading to see why it did or did not count.</p>
      )}
    </div>
  );
}

// ── nightly summaries ────────────────────────────────────────────────────────────────────────

const PAGE_SIZE = 20;

function NightsTable({ slug, lastNight, onPick }: { slug: string; lastNight: string; onPick: (night: string) => void }) {
  const from = addDays(lastNight, -364);
  const q = useQuery({
    queryKey: queryKeys.stationNights(slug, { from, to: lastNight }),
    queryFn: () => getJson<{ nights: StationNight[] }>(`/api/v1/stations/${slug}/nights?from=${from}&to=${lastNight}`),
  });
  const [page, setPage] = useState(0);
  const nights = useMemo(() => [...(q.data?.nights ?? [])].reverse(), [q.data]);
  const pages = Math.max(1, Math.ceil(nights.length / PAGE_SIZE));
  const rows = nights.slice(page * PAGE_SIZE, page * PAGE_SIZE + PAGE_SIZE);
  return (
    <Card>
      <section aria-labelledby="nights-heading">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <div>
            <h2 id="nights-heading" className="text-lg font-bold">Nightly summaries</h2>
            <p className="text-sm text-muted">
              The last year, newest first. Values are calibrated (raw + offset); &ldquo;darkest sustained&rdquo; is the darkest 30-minute median of usable readings; spread is the interquartile range.
            </p>
          </div>
          <a className="text-sm text-accent underline" href={`/api/v1/stations/${slug}/nights.csv?from=${from}&to=${lastNight}`} download>
            Download as CSV
          </a>
        </div>
        {q.isPending ? (
          <p className="mt-4 text-muted" role="status" aria-busy="true">Loading the nights…</p>
        ) : q.error ? (
          <div className="mt-4"><Notice tone="danger" title="The nights did not load">{(q.error as Error).message}</Notice></div>
        ) : nights.length === 0 ? (
          <div className="mt-4"><EmptyState title="No nights summarised yet">Nights appear here once the meter&apos;s readings are in and summarised.</EmptyState></div>
        ) : (
          <>
            <div className="mt-4 overflow-x-auto">
              <table className="w-full min-w-[44rem] text-left text-sm" data-testid="nights-table">
                <caption className="sr-only">Nightly summaries, page {page + 1} of {pages}</caption>
                <thead className="text-muted">
                  <tr>
                    {["Night", "Readings", "Usable", "Median", "Darkest sustained", "Spread", "Usable hours", "Calibration offset"].map((h) => (
                      <th key={h} scope="col" className="py-2 pr-3 font-bold">{h}</th>
                    ))}
                  </tr>
                </thead>
                <tbody>
                  {rows.map((n) => (
                    <tr key={n.night} className="border-t border-line">
                      <th scope="row" className="py-1 pr-3 font-normal">
                        <button type="button" className="min-h-9 text-accent underline" onClick={() => onPick(n.night)} aria-label={`Show the night of ${n.night} on the chart`}>
                          {n.night}
                        </button>
                      </th>
                      <td className="py-1 pr-3">{n.readings}</td>
                      <td className="py-1 pr-3">{n.usableReadings}</td>
                      <td className="py-1 pr-3 font-mono">{fmt(n.medianMag)}</td>
                      <td className="py-1 pr-3 font-mono">{fmt(n.darkestSustainedMag)}</td>
                      <td className="py-1 pr-3 font-mono">{fmt(n.spreadMag)}</td>
                      <td className="py-1 pr-3">{n.usableHours.toFixed(1)}</td>
                      <td className="py-1 pr-3 font-mono">{n.calibrationOffsetMag === 0 ? "0" : `${n.calibrationOffsetMag > 0 ? "+" : "−"}${Math.abs(n.calibrationOffsetMag).toFixed(2)}`}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
            <nav className="mt-3 flex items-center gap-2" aria-label="Nightly summaries pages">
              <Button variant="secondary" size="sm" disabled={page === 0} onClick={() => setPage(page - 1)}>Newer</Button>
              <span className="text-sm text-muted" aria-live="polite">Page {page + 1} of {pages} · {nights.length} nights</span>
              <Button variant="secondary" size="sm" disabled={page >= pages - 1} onClick={() => setPage(page + 1)}>Older</Button>
            </nav>
          </>
        )}
      </section>
    </Card>
  );
}

// ── calibration ──────────────────────────────────────────────────────────────────────────────

function Calibrations({ slug, calibrations, canManage, lastNight }: { slug: string; calibrations: Calibration[]; canManage: boolean; lastNight: string }) {
  const [state, action, pending] = useActionState(addCalibrationAction, {} as FormState);
  const fe = state.fieldErrors ?? {};
  const v = state.values ?? {};
  return (
    <Card>
      <section aria-labelledby="cal-heading">
        <h2 id="cal-heading" className="text-lg font-bold">Calibration</h2>
        <p className="text-sm text-muted">
          An offset is added to this meter&apos;s raw values from its effective night on, when nights are summarised. Raw readings are never changed.
        </p>
        {calibrations.length === 0 ? (
          <p className="mt-3 text-sm">No calibration offsets: raw values are used as they are.</p>
        ) : (
          <div className="mt-3 overflow-x-auto">
            <table className="w-full text-left text-sm">
              <caption className="sr-only">Calibration history, newest first</caption>
              <thead className="text-muted">
                <tr>
                  <th scope="col" className="py-1 pr-3">From night</th>
                  <th scope="col" className="py-1 pr-3">Offset</th>
                  <th scope="col" className="py-1 pr-3">Note</th>
                  <th scope="col" className="py-1 pr-3">Added</th>
                </tr>
              </thead>
              <tbody>
                {calibrations.map((c) => (
                  <tr key={c.id} className="border-t border-line">
                    <td className="py-1 pr-3">{c.effectiveFrom}</td>
                    <td className="py-1 pr-3 font-mono">{c.offsetMag >= 0 ? "+" : "−"}{Math.abs(c.offsetMag).toFixed(2)} mag/arcsec²</td>
                    <td className="py-1 pr-3">{c.note || "—"}</td>
                    <td className="py-1 pr-3">{c.createdAt.slice(0, 10)}{c.createdByName ? ` by ${c.createdByName}` : ""}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
        {canManage ? (
          <form action={action} className="mt-4 grid gap-3 sm:grid-cols-[10rem_10rem_1fr_auto] sm:items-end" noValidate>
            <input type="hidden" name="stationSlug" value={slug} />
            <Field label="From night" htmlFor="cal-from" error={fe.effectiveFrom}>
              <Input id="cal-from" name="effectiveFrom" type="date" required defaultValue={v.effectiveFrom ?? lastNight} aria-invalid={!!fe.effectiveFrom} aria-describedby={fe.effectiveFrom ? "cal-from-error" : undefined} />
            </Field>
            <Field label="Offset (mag/arcsec²)" htmlFor="cal-offset" error={fe.offsetMag}>
              <Input id="cal-offset" name="offsetMag" inputMode="decimal" required placeholder="e.g. 0.05" defaultValue={v.offsetMag ?? ""} aria-invalid={!!fe.offsetMag} aria-describedby={fe.offsetMag ? "cal-offset-error" : undefined} />
            </Field>
            <Field label="Note" htmlFor="cal-note" error={fe.note} hint="What it was checked against.">
              <Input id="cal-note" name="note" defaultValue={v.note ?? ""} aria-invalid={!!fe.note} />
            </Field>
            <Button type="submit" disabled={pending}>{pending ? "Adding…" : "Add offset"}</Button>
            <div className="sm:col-span-4" aria-live="polite">
              {state.ok ? <Notice tone="ok">{state.ok}</Notice> : null}
              {state.error ? <Notice tone="danger">{state.error}</Notice> : null}
            </div>
          </form>
        ) : null}
      </section>
    </Card>
  );
}

// ── tokens ───────────────────────────────────────────────────────────────────────────────────

function Tokens({ slug, tokens, retired, appUrl, timeZone, lastNight }: { slug: string; tokens: Token[]; retired: boolean; appUrl: string; timeZone: string; lastNight: string }) {
  const [created, createAction, creating] = useActionState(createTokenAction, {} as FormState<CreatedToken>);
  const [revoked, revokeAction, revoking] = useActionState(revokeTokenAction, {} as FormState);
  // The secret is shown once: until the person dismisses it, or another token replaces it.
  const [dismissed, setDismissed] = useState<string | null>(null);
  const [copiedFor, setCopiedFor] = useState<string | null>(null);
  const secret = created.data?.token;
  const showSecret = !!secret && dismissed !== created.data?.id;
  const copied = showSecret && copiedFor === created.data?.id;
  const fe = created.fieldErrors ?? {};
  // Last night at 22:00 local, with the zone's offset: the same text on the server and in the browser.
  const example = DateTime.fromISO(`${lastNight}T22:00`, { zone: timeZone }).toISO({ suppressMilliseconds: true, includeOffset: true });
  const snippet = `curl -X POST ${appUrl}/api/v1/readings \\
  -H "Authorization: Bearer ${showSecret ? secret : "<your station token>"}" \\
  -H "Content-Type: application/json" \\
  -d '{"readings":[{"takenAt":"${example}","mag":21.43,"tempC":4.5}]}'`;

  return (
    <Card>
      <section aria-labelledby="tokens-heading">
        <h2 id="tokens-heading" className="text-lg font-bold">Station tokens</h2>
        <p className="text-sm text-muted">A token lets one meter or logger send this station&apos;s readings. Each is shown once when created; only its first characters are kept for this list.</p>

        {showSecret ? (
          <div className="mt-4 rounded-lg border border-warn/60 bg-warn/10 p-3" role="region" aria-label="The new token" data-testid="new-token">
            <p className="font-bold">Copy this token now: it will not be shown again.</p>
            <p className="text-sm">Store it in the meter or logger&apos;s settings. If it is lost, create a new one and revoke this one.</p>
            <div className="mt-2 flex flex-wrap items-center gap-2">
              <code className="block min-h-11 flex-1 select-all break-all rounded-lg border border-line bg-bg p-3 font-mono text-sm" data-testid="new-token-value">
                {secret}
              </code>
              <Button
                variant="secondary"
                onClick={async () => {
                  await navigator.clipboard?.writeText(secret!).then(() => setCopiedFor(created.data!.id), () => setCopiedFor(null));
                }}
              >
                {copied ? "Copied" : "Copy"}
              </Button>
              <Button variant="ghost" onClick={() => setDismissed(created.data!.id)}>I have stored it</Button>
            </div>
            <p className="sr-only" aria-live="polite">{copied ? "Token copied to the clipboard." : ""}</p>
          </div>
        ) : null}

        {tokens.length === 0 ? (
          <p className="mt-3 text-sm">No tokens yet: create one for the meter.</p>
        ) : (
          <div className="mt-3 overflow-x-auto">
            <table className="w-full min-w-[36rem] text-left text-sm" data-testid="tokens-table">
              <caption className="sr-only">This station&apos;s tokens</caption>
              <thead className="text-muted">
                <tr>
                  <th scope="col" className="py-1 pr-3">Name</th>
                  <th scope="col" className="py-1 pr-3">Starts with</th>
                  <th scope="col" className="py-1 pr-3">Created</th>
                  <th scope="col" className="py-1 pr-3">Last used</th>
                  <th scope="col" className="py-1 pr-3">State</th>
                </tr>
              </thead>
              <tbody>
                {tokens.map((t) => (
                  <tr key={t.id} className="border-t border-line">
                    <td className="py-1 pr-3">{t.name}</td>
                    <td className="py-1 pr-3 font-mono">{t.prefix}…</td>
                    <td className="py-1 pr-3">{t.createdAt.slice(0, 10)}</td>
                    <td className="py-1 pr-3">{t.lastUsedAt ? DateTime.fromISO(t.lastUsedAt).toFormat("yyyy-LL-dd HH:mm") : "never"}</td>
                    <td className="py-1 pr-3">
                      {t.revokedAt ? (
                        `revoked ${t.revokedAt.slice(0, 10)}`
                      ) : (
                        <form action={revokeAction} onSubmit={(e) => { if (!window.confirm(`Revoke “${t.name}” (${t.prefix}…)? A meter using it stops being accepted.`)) e.preventDefault(); }}>
                          <input type="hidden" name="stationSlug" value={slug} />
                          <input type="hidden" name="tokenId" value={t.id} />
                          <Button type="submit" variant="danger" size="sm" disabled={revoking} aria-label={`Revoke token ${t.name}`}>Revoke</Button>
                        </form>
                      )}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
        <div aria-live="polite" className="mt-2">
          {revoked.ok ? <Notice tone="ok">{revoked.ok}</Notice> : null}
          {revoked.error ? <Notice tone="danger">{revoked.error}</Notice> : null}
        </div>

        {retired ? (
          <div className="mt-4"><Notice tone="warn">This station is retired; it cannot get new tokens.</Notice></div>
        ) : (
          <form action={createAction} className="mt-4 flex flex-wrap items-end gap-3" noValidate>
            <input type="hidden" name="stationSlug" value={slug} />
            <div className="min-w-56 flex-1">
              <Field label="New token's name" htmlFor="token-name" error={fe.name} hint="After the device that will use it, e.g. “roof logger”.">
                <Input id="token-name" name="name" required maxLength={100} aria-invalid={!!fe.name} aria-describedby={fe.name ? "token-name-error" : "token-name-hint"} />
              </Field>
            </div>
            <Button type="submit" disabled={creating}>{creating ? "Creating…" : "Create token"}</Button>
            {created.error ? <div className="w-full"><Notice tone="danger">{created.error}</Notice></div> : null}
          </form>
        )}

        <h3 className="mt-6 font-bold">How to connect your meter</h3>
        <p className="text-sm text-muted">
          The meter or its logger sends readings with its token. Times in ISO 8601 with an offset; values in mag/arcsec². Each batch answers with how many were accepted, already stored (duplicates), or rejected and why. CSV bodies (<code>text/csv</code>, columns takenAt,mag,tempC) work too.
        </p>
        <pre className="mt-2 overflow-x-auto rounded-lg border border-line bg-bg p-3 font-mono text-xs" aria-label="Example request">{snippet}</pre>
      </section>
    </Card>
  );
}
