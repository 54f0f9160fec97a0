"use client";

import dynamic from "next/dynamic";
import { useRouter } from "next/navigation";
import { useMemo, useState, useTransition, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Card, EmptyState, Notice } from "@/components/ui/card";
import { Field, Input, Select } from "@/components/ui/input";
import type { GlowExistingSource, GlowSiteResult } from "@/db/schema/briefs";
import { WALKER_VALID_MAX_KM, WALKER_VALID_MIN_KM } from "@/lib/glow";
import { GLOW_SITE_RADIUS_KM, planGlow } from "@/lib/glow-estimates/plan";
import type { GlowSiteChoice } from "@/lib/glow-estimates/service";
import { deleteGlowEstimateAction, saveGlowEstimateAction } from "./actions";

const GlowMap = dynamic(() => import("@/components/glow/glow-map").then((m) => m.GlowMap), {
  ssr: false,
  loading: () => (
    <div role="status" className="flex h-72 items-center justify-center rounded-card border border-line text-sm text-muted sm:h-[28rem]">
      Loading the map…
    </div>
  ),
});

type Saved = { id: string; name: string; createdAt: string; results: GlowSiteResult[] };
const num = (s: string) => (s.trim() === "" ? undefined : Number(s));
const signed = (v: number, d: number) => `${v < 0 ? "\u2212" : "+"}${Math.abs(v).toFixed(d)}`;

export function GlowClient({ sites, saved, caution }: { sites: GlowSiteChoice[]; saved: Saved[]; caution: string }) {
  const router = useRouter();
  const [name, setName] = useState("");
  const [lat, setLat] = useState("");
  const [lon, setLon] = useState("");
  const [kind, setKind] = useState<"population" | "lumens">("population");
  const [size, setSize] = useState("");
  const [sources, setSources] = useState<GlowExistingSource[]>([]);
  const [placing, setPlacing] = useState<"proposed" | "source">("proposed");
  const [src, setSrc] = useState({ name: "", population: "", mode: "position" as "position" | "distance", lat: "", lon: "", siteSlug: sites[0]?.slug ?? "", distanceKm: "" });
  const [srcError, setSrcError] = useState<string | null>(null);
  const [state, setState] = useState<{ ok?: string; error?: string; fieldErrors?: Record<string, string> }>({});
  const [pending, start] = useTransition();

  const proposed = useMemo(() => {
    const la = num(lat);
    const lo = num(lon);
    return la !== undefined && lo !== undefined && Number.isFinite(la) && Number.isFinite(lo) && Math.abs(la) <= 90 && Math.abs(lo) <= 180 ? { lat: la, lon: lo } : null;
  }, [lat, lon]);
  const sizeN = num(size);
  const preview = useMemo(() => {
    if (!proposed || sizeN === undefined || !(sizeN > 0)) return null;
    return planGlow({ proposed: { ...proposed, ...(kind === "population" ? { population: sizeN } : { lumens: sizeN }) }, sources, sites });
  }, [proposed, sizeN, kind, sources, sites]);

  const pick = (la: number, lo: number) => {
    if (placing === "proposed") {
      setLat(String(la));
      setLon(String(lo));
    } else setSrc((s) => ({ ...s, mode: "position", lat: String(la), lon: String(lo) }));
  };

  const addSource = (e: FormEvent) => {
    e.preventDefault();
    const population = num(src.population);
    if (!src.name.trim()) return setSrcError("Name the source (e.g. the nearest town).");
    if (!population || !(population > 0)) return setSrcError("Give its population (more than 0).");
    if (src.mode === "position") {
      const la = num(src.lat);
      const lo = num(src.lon);
      if (la === undefined || lo === undefined || !Number.isFinite(la) || !Number.isFinite(lo) || Math.abs(la) > 90 || Math.abs(lo) > 180) return setSrcError("Give a latitude (−90 to 90) and longitude (−180 to 180), or click the map.");
      setSources((l) => [...l, { name: src.name.trim(), population, lat: la, lon: lo }]);
    } else {
      const d = num(src.distanceKm);
      if (!d || !(d > 0)) return setSrcError("Give the distance from the site in km (more than 0).");
      setSources((l) => [...l, { name: src.name.trim(), population, siteSlug: src.siteSlug, distanceKm: d }]);
    }
    setSrcError(null);
    setSrc((s) => ({ ...s, name: "", population: "", lat: "", lon: "", distanceKm: "" }));
    setPlacing("proposed");
  };

  const save = (e: FormEvent) => {
    e.preventDefault();
    start(async () => {
      const r = await saveGlowEstimateAction({
        name,
        lat: num(lat) as number,
        lon: num(lon) as number,
        ...(kind === "population" ? { population: sizeN } : { lumens: sizeN }),
        sources: sources as never,
      });
      setState(r);
      if (r.ok) router.refresh();
    });
  };
  const fe = state.fieldErrors ?? {};

  return (
    <div className="flex flex-col gap-6">
      <Notice tone="warn" title="An approximation, not a lighting design">
        {caution} Defer to qualified lighting professionals and the local codes.
      </Notice>
      <div className="grid gap-6 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="flex flex-col gap-3">
          <div role="radiogroup" aria-label="What a map click places" className="flex flex-wrap gap-2">
            {(["proposed", "source"] as const).map((p) => (
              <label key={p} className="flex min-h-11 items-center gap-2 rounded-lg border border-line px-3 text-sm font-bold">
                <input type="radio" name="placing" className="h-5 w-5 accent-accent" checked={placing === p} onChange={() => setPlacing(p)} />
                {p === "proposed" ? "Click places the development" : "Click places an existing source"}
              </label>
            ))}
          </div>
          <GlowMap
            sites={sites}
            proposed={proposed}
            sources={sources.filter((s): s is GlowExistingSource & { lat: number; lon: number } => s.lat !== undefined && s.lon !== undefined)}
            placing={placing === "proposed" ? "the proposed development" : "an existing light source"}
            onPick={pick}
          />
        </div>
        <Card>
          <form onSubmit={save} className="flex flex-col gap-4" noValidate aria-labelledby="proposed-title">
            <h2 id="proposed-title" className="text-lg font-bold">
              The proposed development
            </h2>
            <Field label="Name of this estimate" htmlFor="glow-name" error={fe.name}>
              <Input id="glow-name" value={name} onChange={(e) => setName(e.target.value)} placeholder="e.g. Ridge Road housing, 1,200 homes" aria-invalid={!!fe.name} />
            </Field>
            <div className="grid grid-cols-2 gap-3">
              <Field label="Latitude" htmlFor="glow-lat" error={fe.lat}>
                <Input id="glow-lat" inputMode="decimal" value={lat} onChange={(e) => setLat(e.target.value)} aria-invalid={!!fe.lat} />
              </Field>
              <Field label="Longitude" htmlFor="glow-lon" error={fe.lon}>
                <Input id="glow-lon" inputMode="decimal" value={lon} onChange={(e) => setLon(e.target.value)} aria-invalid={!!fe.lon} />
              </Field>
            </div>
            <fieldset className="flex flex-wrap gap-2">
              <legend className="mb-1 text-sm font-bold">Size given as</legend>
              {(["population", "lumens"] as const).map((k) => (
                <label key={k} className="flex min-h-11 items-center gap-2 text-sm">
                  <input type="radio" name="kind" className="h-5 w-5 accent-accent" checked={kind === k} onChange={() => setKind(k)} />
                  {k === "population" ? "Added population" : "Installed lumens"}
                </label>
              ))}
            </fieldset>
            <Field
              label={kind === "population" ? "Added population (people)" : "Installed outdoor lumens (lm)"}
              htmlFor="glow-size"
              error={fe.population ?? fe.lumens}
              hint={kind === "lumens" ? "Converted at an assumed 1,000 lm per person (an assumption, not a measured figure)." : undefined}
            >
              <Input id="glow-size" inputMode="numeric" value={size} onChange={(e) => setSize(e.target.value)} aria-invalid={!!(fe.population ?? fe.lumens)} />
            </Field>
            {state.error ? <Notice tone="danger">{state.error}</Notice> : null}
            {state.ok ? <Notice tone="ok">{state.ok}</Notice> : null}
            <Button type="submit" disabled={pending} className="self-start">
              {pending ? "Saving…" : "Save this estimate"}
            </Button>
          </form>
        </Card>
      </div>

      <Card aria-labelledby="sources-title">
        <h2 id="sources-title" className="text-lg font-bold">
          Known existing light sources
        </h2>
        <p className="mb-3 text-sm text-muted">
          Walker&apos;s law needs the towns that make each site&apos;s glow today: the measured brightness is shared among them, which sets the scale for the new development. A source given by position counts for
          every site; one given as a distance counts for that site only.
        </p>
        {sources.length ? (
          <ul className="mb-4 flex flex-col gap-1 text-sm">
            {sources.map((s, i) => (
              <li key={i} className="flex flex-wrap items-center gap-2">
                <span className="font-bold">{s.name}</span> · {s.population.toLocaleString()} people ·{" "}
                {s.lat !== undefined ? `at ${s.lat}, ${s.lon}` : `${s.distanceKm} km from ${sites.find((x) => x.slug === s.siteSlug)?.name ?? s.siteSlug}`}
                <Button size="sm" variant="ghost" onClick={() => setSources((l) => l.filter((_, j) => j !== i))} aria-label={`Remove ${s.name}`}>
                  Remove
                </Button>
              </li>
            ))}
          </ul>
        ) : (
          <p className="mb-4 text-sm text-muted">None yet.</p>
        )}
        <form onSubmit={addSource} className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4" noValidate aria-label="Add an existing source">
          <Field label="Source name" htmlFor="src-name">
            <Input id="src-name" value={src.name} onChange={(e) => setSrc({ ...src, name: e.target.value })} />
          </Field>
          <Field label="Population" htmlFor="src-pop">
            <Input id="src-pop" inputMode="numeric" value={src.population} onChange={(e) => setSrc({ ...src, population: e.target.value })} />
          </Field>
          <Field label="Given as" htmlFor="src-mode">
            <Select id="src-mode" value={src.mode} onChange={(e) => setSrc({ ...src, mode: e.target.value as "position" | "distance" })}>
              <option value="position">Position (or click the map)</option>
              <option value="distance">Distance from a site</option>
            </Select>
          </Field>
          {src.mode === "position" ? (
            <div className="grid grid-cols-2 gap-2">
              <Field label="Latitude" htmlFor="src-lat">
                <Input id="src-lat" inputMode="decimal" value={src.lat} onChange={(e) => setSrc({ ...src, lat: e.target.value })} />
              </Field>
              <Field label="Longitude" htmlFor="src-lon">
                <Input id="src-lon" inputMode="decimal" value={src.lon} onChange={(e) => setSrc({ ...src, lon: e.target.value })} />
              </Field>
            </div>
          ) : (
            <div className="grid grid-cols-2 gap-2">
              <Field label="Site" htmlFor="src-site">
                <Select id="src-site" value={src.siteSlug} onChange={(e) => setSrc({ ...src, siteSlug: e.target.value })}>
                  {sites.map((s) => (
                    <option key={s.slug} value={s.slug}>
                      {s.name}
                    </option>
                  ))}
                </Select>
              </Field>
              <Field label="Distance (km)" htmlFor="src-km">
                <Input id="src-km" inputMode="decimal" value={src.distanceKm} onChange={(e) => setSrc({ ...src, distanceKm: e.target.value })} />
              </Field>
            </div>
          )}
          {srcError ? (
            <p role="alert" className="text-sm text-danger sm:col-span-2 lg:col-span-4">
              {srcError}
            </p>
          ) : null}
          <Button type="submit" variant="secondary" className="self-end">
            Add source
          </Button>
        </form>
      </Card>

      <Card aria-labelledby="results-title">
        <h2 id="results-title" className="text-lg font-bold">
          Added zenith glow at sites within {GLOW_SITE_RADIUS_KM} km
        </h2>
        {!preview ? (
          <EmptyState title="Place the development and give its size">The estimate for every site within {GLOW_SITE_RADIUS_KM} km appears here as you type.</EmptyState>
        ) : preview.length === 0 ? (
          <EmptyState title={`No site within ${GLOW_SITE_RADIUS_KM} km`}>Walker&apos;s law is not used beyond that distance.</EmptyState>
        ) : (
          <div className="overflow-x-auto">
            <table className="w-full text-left text-sm" data-testid="glow-results">
              <caption className="sr-only">Estimated added glow per site</caption>
              <thead>
                <tr className="border-b border-line">
                  <th scope="col" className="py-2 pr-3">Site</th>
                  <th scope="col" className="py-2 pr-3 text-right">Distance</th>
                  <th scope="col" className="py-2 pr-3 text-right">Measured now</th>
                  <th scope="col" className="py-2 pr-3 text-right">Change</th>
                  <th scope="col" className="py-2 pr-3 text-right">Brighter</th>
                  <th scope="col" className="py-2">Notes</th>
                </tr>
              </thead>
              <tbody>
                {preview.map((r) => (
                  <tr key={r.siteSlug} className="border-b border-line align-top">
                    <th scope="row" className="py-2 pr-3 font-bold">{r.siteName}</th>
                    <td className="py-2 pr-3 text-right font-mono tabular-nums">{r.distanceKm.toFixed(1)} km</td>
                    <td className="py-2 pr-3 text-right font-mono tabular-nums">{r.measuredMag === null ? "–" : `${r.measuredMag.toFixed(2)}`}</td>
                    <td className="py-2 pr-3 text-right font-mono tabular-nums">{r.ok && r.deltaMag !== null ? `${signed(r.deltaMag, 3)} mag/arcsec²` : "–"}</td>
                    <td className="py-2 pr-3 text-right font-mono tabular-nums">{r.ok && r.percentBrighter !== null ? `${r.percentBrighter.toFixed(1)} %` : "–"}</td>
                    <td className="py-2 text-xs">
                      {!r.ok ? <span className="text-warn">{r.reason}</span> : null}
                      {r.ok && !r.withinValidity ? (
                        <span className="font-bold text-warn">
                          Outside {WALKER_VALID_MIN_KM}–{WALKER_VALID_MAX_KM} km: Walker&apos;s law holds only roughly there.{" "}
                        </span>
                      ) : null}
                      {r.ok ? r.warnings.filter((w) => !/outside the/.test(w)).join(" ") : null}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
            <p className="mt-2 text-xs text-muted">
              Measured now: the site&apos;s darkness now (median of its last 30 usable nights, mag/arcsec²), as on its site page. Change: negative means a brighter sky.
            </p>
          </div>
        )}
      </Card>

      <section aria-labelledby="saved-title">
        <h2 id="saved-title" className="mb-3 text-lg font-bold">
          Saved estimates
        </h2>
        {saved.length === 0 ? (
          <EmptyState title="None saved yet">Saved estimates can be attached to a hearing brief as a clearly marked “what-if” section.</EmptyState>
        ) : (
          <ul className="flex flex-col gap-2">
            {saved.map((s) => (
              <li key={s.id}>
                <Card className="flex flex-wrap items-center justify-between gap-2">
                  <span>
                    <span className="font-bold">{s.name}</span>{" "}
                    <span className="text-sm text-muted">
                      saved {s.createdAt.slice(0, 10)} · {s.results.filter((r) => r.ok).length} site(s) estimated
                    </span>
                  </span>
                  <Button
                    size="sm"
                    variant="danger"
                    onClick={() =>
                      start(async () => {
                        const r = await deleteGlowEstimateAction(s.id);
                        setState(r);
                        router.refresh();
                      })
                    }
                  >
                    Delete
                  </Button>
                </Card>
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}
