"use client";

import { useQuery } from "@tanstack/react-query";
import dynamic from "next/dynamic";
import { useMemo, useState } from "react";
import { MapLegend } from "@/components/map/map-legend";
import type { MapSelection } from "@/components/map/night-map";
import { Notice } from "@/components/ui/card";
import { Field, Input, Select } from "@/components/ui/input";
import type { MapLayers } from "@/lib/map/layers";
import { RAMP_BANDS } from "@/lib/map/ramp";
import { queryKeys } from "@/lib/query-keys";
import { cn } from "@/lib/cn";

const NightMap = dynamic(() => import("@/components/map/night-map").then((m) => m.NightMap), {
  ssr: false,
  loading: () => <div className="h-full w-full animate-pulse bg-raised" data-map-ready="false" />,
});

type Props = { sites: { slug: string; name: string }[]; periods: { value: string; label: string }[] };
type MapData = Omit<MapLayers, "timings">;

const LIST_MAX = 60;

async function fetchMap(filters: Record<string, string>): Promise<MapData> {
  const qs = new URLSearchParams(Object.entries(filters).filter(([, v]) => v !== ""));
  const res = await fetch(`/api/v1/map?${qs}`, { cache: "no-store" });
  const body = await res.json();
  if (!res.ok) throw new Error(body?.error?.message ?? `The map data did not load (${res.status}).`);
  return body as MapData;
}

export function MapClient({ sites, periods }: Props) {
  const [site, setSite] = useState("");
  const [period, setPeriod] = useState("last30");
  const [status, setStatus] = useState("active");
  const [search, setSearch] = useState("");
  const [selection, setSelection] = useState<MapSelection>(null);
  const [flyKey, setFlyKey] = useState(0);

  const filters = { site, period, status };
  const q = useQuery({ queryKey: queryKeys.map(filters), queryFn: () => fetchMap(filters), placeholderData: (prev) => prev });

  const stations = useMemo(() => {
    const all = q.data?.stations.features ?? [];
    const s = search.trim().toLowerCase();
    return s ? all.filter((f) => f.properties.name.toLowerCase().includes(s) || (f.properties.siteName ?? "").toLowerCase().includes(s)) : all;
  }, [q.data, search]);

  return (
    <div className="grid gap-4 lg:grid-cols-[20rem_1fr]">
      <aside className="order-2 flex flex-col gap-4 lg:order-1">
        <form className="grid gap-3 sm:grid-cols-3 lg:grid-cols-1" onSubmit={(e) => e.preventDefault()} aria-label="Map filters">
          <Field label="Site" htmlFor="map-site">
            <Select id="map-site" value={site} onChange={(e) => setSite(e.target.value)}>
              <option value="">All sites</option>
              {sites.map((s) => (
                <option key={s.slug} value={s.slug}>
                  {s.name}
                </option>
              ))}
            </Select>
          </Field>
          <Field label="Period" htmlFor="map-period">
            <Select id="map-period" value={period} onChange={(e) => setPeriod(e.target.value)}>
              {periods.map((p) => (
                <option key={p.value} value={p.value}>
                  {p.label}
                </option>
              ))}
            </Select>
          </Field>
          <Field label="Station status" htmlFor="map-status">
            <Select id="map-status" value={status} onChange={(e) => setStatus(e.target.value)}>
              <option value="active">Active</option>
              <option value="retired">Retired</option>
              <option value="all">All</option>
            </Select>
          </Field>
        </form>
        <MapLegend className="rounded-card border border-line bg-surface p-4" />
        <section aria-labelledby="station-list-title" className="rounded-card border border-line bg-surface p-4">
          <h2 id="station-list-title" className="mb-2 font-bold">
            Stations{q.data ? ` (${q.data.stations.features.length})` : ""}
          </h2>
          <Field label="Find a station" htmlFor="map-search">
            <Input id="map-search" type="search" value={search} onChange={(e) => setSearch(e.target.value)} placeholder="Name or site" />
          </Field>
          <ul className="mt-2 flex max-h-96 flex-col gap-1 overflow-y-auto" data-testid="station-list">
            {stations.slice(0, LIST_MAX).map((f) => {
              const p = f.properties;
              const active = selection?.kind === "station" && selection.slug === p.slug;
              return (
                <li key={p.slug}>
                  <button
                    type="button"
                    data-station={p.slug}
                    data-lnglat={f.geometry.coordinates.join(",")}
                    onClick={() => {
                      setSelection({ kind: "station", slug: p.slug });
                      setFlyKey((k) => k + 1);
                    }}
                    className={cn(
                      "flex min-h-11 w-full items-center justify-between gap-2 rounded-lg px-2 text-left text-sm hover:bg-raised",
                      active && "bg-raised ring-1 ring-accent",
                    )}
                    aria-pressed={active}
                  >
                    <span>
                      <span className="font-bold">{p.name}</span>
                      <span className="block text-xs text-muted">{p.siteName ?? "no site"}</span>
                    </span>
                    <span className="font-mono text-xs tabular-nums">
                      {p.medianMag === null ? "no data" : p.medianMag.toFixed(2)}
                      <span className="block text-muted">{p.rampClass === null ? "" : RAMP_BANDS[p.rampClass]?.words}</span>
                    </span>
                  </button>
                </li>
              );
            })}
          </ul>
          {stations.length > LIST_MAX ? <p className="mt-2 text-xs text-muted">Showing {LIST_MAX} of {stations.length}; narrow the search.</p> : null}
        </section>
      </aside>
      <div className="order-1 flex flex-col gap-2 lg:order-2">
        {q.error ? <Notice tone="danger" title="The map data did not load">{(q.error as Error).message}</Notice> : null}
        {q.data && q.data.stations.features.length === 0 && q.data.sites.features.length === 0 ? (
          <Notice>Nothing to show with these filters.</Notice>
        ) : null}
        <div className="h-[60vh] min-h-80 overflow-hidden rounded-card border border-line lg:h-[calc(100vh-12rem)]">
          <NightMap data={q.data} selection={selection} onSelect={setSelection} flyKey={flyKey} fitKey={q.data ? `${site}|${q.data.sites.features.length}` : ""} className="relative h-full w-full" />
        </div>
        <p className="text-xs text-muted">
          {q.data ? `${q.data.period.label}. ` : ""}Circles: stations (brighter sky = bigger circle; a hollow circle has no usable night in the period).
          Shaded outlines: sites (dashed = private). Diamonds: field-survey spots. Base map: Natural Earth and US Census boundaries, public domain.
        </p>
      </div>
    </div>
  );
}
