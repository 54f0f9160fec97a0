"use client";

import dynamic from "next/dynamic";
import { useRouter } from "next/navigation";
import { useId, useState, useTransition } from "react";
import { Button } from "@/components/ui/button";
import { Card, Notice } from "@/components/ui/card";
import { Field, Input, Select, Textarea } from "@/components/ui/input";
import type { SpotMapSite } from "@/components/surveys/spot-map";
import { median } from "@/lib/stats/robust";
import { createSurveyAction, type SurveyActionState } from "./actions";

const SpotMap = dynamic(() => import("@/components/surveys/spot-map").then((m) => m.SpotMap), {
  ssr: false,
  loading: () => (
    <p role="status" className="flex h-72 items-center justify-center rounded-card border border-line text-muted sm:h-96">
      Loading the map…
    </p>
  ),
});

/** Same list as lib/surveys/service.ts SKY_CONDITIONS (kept here so the client bundle has no server code). */
const CONDITIONS = ["clear", "thin cloud", "partly cloudy", "overcast", "haze/fog", "snow on ground"] as const;

type Spot = { key: number; lat: string; lon: string; time: string; readings: string[]; conditions: string; notes: string };

/** A datetime-local value (the device's zone) for now, to the minute. */
function nowLocal(): string {
  const d = new Date();
  d.setSeconds(0, 0);
  return new Date(d.getTime() - d.getTimezoneOffset() * 60_000).toISOString().slice(0, 16);
}

let nextKey = 1;
const newSpot = (): Spot => ({ key: nextKey++, lat: "", lon: "", time: nowLocal(), readings: ["", "", ""], conditions: "clear", notes: "" });

function liveStats(values: string[]) {
  const nums = values.filter((v) => v.trim() !== "").map(Number).filter(Number.isFinite);
  if (nums.length === 0) return null;
  return { n: nums.length, median: median(nums), spread: Math.max(...nums) - Math.min(...nums) };
}

export function SurveyForm({ sites }: { sites: SpotMapSite[] }) {
  const router = useRouter();
  const [title, setTitle] = useState("");
  const [notes, setNotes] = useState("");
  const [spots, setSpots] = useState<Spot[]>(() => [newSpot()]);
  const [active, setActive] = useState(0);
  const [state, setState] = useState<SurveyActionState>({});
  const [pending, start] = useTransition();
  const [geo, setGeo] = useState<{ spot: number; busy: boolean; error?: string } | null>(null);

  const issue = (path: string) => state.issues?.find((i) => i.path === path)?.message;
  const update = (i: number, patch: Partial<Spot>) => setSpots((s) => s.map((x, j) => (j === i ? { ...x, ...patch } : x)));

  function locate(i: number) {
    if (typeof navigator === "undefined" || !navigator.geolocation) {
      setGeo({ spot: i, busy: false, error: "This device or browser cannot share its location. Tap the map or type the position." });
      return;
    }
    setGeo({ spot: i, busy: true });
    navigator.geolocation.getCurrentPosition(
      (p) => {
        update(i, { lat: String(Math.round(p.coords.latitude * 1e6) / 1e6), lon: String(Math.round(p.coords.longitude * 1e6) / 1e6) });
        setGeo({ spot: i, busy: false });
      },
      (err) =>
        setGeo({
          spot: i,
          busy: false,
          error:
            err.code === err.PERMISSION_DENIED
              ? "Location permission was denied. Allow it in the browser's site settings, or tap the map or type the position."
              : err.code === err.TIMEOUT
                ? "The location did not arrive in time (no satellite fix?). Try again in the open, or tap the map or type the position."
                : "The location is not available right now. Tap the map or type the position.",
        }),
      { enableHighAccuracy: true, timeout: 20_000, maximumAge: 30_000 },
    );
  }

  function submit(e: React.FormEvent) {
    e.preventDefault();
    // Blank reading boxes are left out; `boxes` maps what is sent back to the box it came from.
    const boxes = spots.map((s) => s.readings.map((v, j) => (v.trim() === "" ? -1 : j)).filter((j) => j >= 0));
    const input = {
      title,
      notes,
      spots: spots.map((s) => ({
        lat: s.lat.trim() === "" ? (undefined as unknown as number) : Number(s.lat),
        lon: s.lon.trim() === "" ? (undefined as unknown as number) : Number(s.lon),
        takenAt: s.time ? new Date(s.time).toISOString() : "",
        readings: s.readings.filter((v) => v.trim() !== "").map((v) => v.trim()),
        conditions: s.conditions as (typeof CONDITIONS)[number],
        notes: s.notes,
      })),
    };
    start(async () => {
      const r = await createSurveyAction(input);
      r.issues = r.issues?.map((iss) => {
        const m = /^spots\.(\d+)\.readings\.(\d+)$/.exec(iss.path);
        if (!m) return iss;
        const box = boxes[Number(m[1])]?.[Number(m[2])] ?? Number(m[2]);
        return { path: `spots.${m[1]}.readings.${box}`, message: iss.message.replace(/reading \d+:/, `reading ${box + 1}:`) };
      });
      setState(r);
      if (r.ok && r.id) router.push(`/surveys/${r.id}`);
    });
  }

  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-6">
      <Card>
        <div className="flex flex-col gap-4">
          <Field label="Walk title" htmlFor="sv-title" error={issue("title")}>
            <Input id="sv-title" value={title} onChange={(e) => setTitle(e.target.value)} required maxLength={200} aria-invalid={!!issue("title")} aria-describedby={issue("title") ? "sv-title-error" : undefined} />
          </Field>
          <Field label="Notes" htmlFor="sv-notes" error={issue("notes")} hint="Route, companions, anything that affected the readings.">
            <Textarea id="sv-notes" value={notes} onChange={(e) => setNotes(e.target.value)} rows={3} />
          </Field>
        </div>
      </Card>

      <Card>
        <h2 className="font-bold">Where</h2>
        <p className="mb-3 text-sm text-muted">Tap the map to place spot {active + 1}, or use the location buttons and fields below.</p>
        <SpotMap
          spots={spots.map((s) => ({ lat: s.lat === "" ? null : Number(s.lat), lon: s.lon === "" ? null : Number(s.lon) }))}
          active={active}
          sites={sites}
          onPick={(lat, lon) => update(active, { lat: String(lat), lon: String(lon) })}
        />
      </Card>

      <ol className="flex flex-col gap-4" aria-label="Spots">
        {spots.map((s, i) => (
          <SpotCard
            key={s.key}
            spot={s}
            index={i}
            active={i === active}
            onActivate={() => setActive(i)}
            onChange={(p) => update(i, p)}
            onRemove={spots.length > 1 ? () => {
              setSpots((all) => all.filter((_, j) => j !== i));
              setActive((a) => Math.max(0, a >= i ? a - 1 : a));
            } : undefined}
            onLocate={() => locate(i)}
            geo={geo?.spot === i ? geo : null}
            issue={(f) => issue(`spots.${i}${f ? `.${f}` : ""}`)}
          />
        ))}
      </ol>

      <div className="flex flex-wrap gap-3">
        <Button variant="secondary" onClick={() => { setSpots((all) => [...all, newSpot()]); setActive(spots.length); }}>
          Add a spot
        </Button>
        <Button type="submit" disabled={pending}>{pending ? "Saving…" : "Save the walk"}</Button>
      </div>
      <div aria-live="polite">
        {state.error ? (
          <Notice tone="danger" title={state.error}>
            {state.issues?.length ? (
              <ul className="list-disc pl-5" data-testid="survey-issues">
                {state.issues.map((i) => <li key={i.path}>{i.message}</li>)}
              </ul>
            ) : null}
          </Notice>
        ) : null}
      </div>
    </form>
  );
}

type SpotCardProps = {
  spot: Spot;
  index: number;
  active: boolean;
  onActivate: () => void;
  onChange: (p: Partial<Spot>) => void;
  onRemove?: () => void;
  onLocate: () => void;
  geo: { busy: boolean; error?: string } | null;
  issue: (field?: string) => string | undefined;
};

function SpotCard({ spot, index, active, onActivate, onChange, onRemove, onLocate, geo, issue }: SpotCardProps) {
  const id = useId();
  const stats = liveStats(spot.readings);
  const n = index + 1;
  return (
    <li className={`rounded-card border bg-surface p-4 ${active ? "border-accent" : "border-line"}`} onFocus={onActivate} aria-label={`Spot ${n}`}>
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h3 className="font-bold">Spot {n}{active ? <span className="ml-2 text-xs font-normal text-muted">(the map places this one)</span> : null}</h3>
        <div className="flex gap-2">
          {!active ? <Button size="sm" variant="ghost" onClick={onActivate}>Place on the map</Button> : null}
          {onRemove ? <Button size="sm" variant="ghost" onClick={onRemove} aria-label={`Remove spot ${n}`}>Remove</Button> : null}
        </div>
      </div>
      {issue() ? <p role="alert" className="mt-1 text-sm text-danger">{issue()}</p> : null}
      <div className="mt-3 grid gap-3 sm:grid-cols-3">
        <Field label="Latitude" htmlFor={`${id}-lat`} error={issue("lat")}>
          <Input id={`${id}-lat`} inputMode="decimal" value={spot.lat} onChange={(e) => onChange({ lat: e.target.value })} aria-invalid={!!issue("lat")} placeholder="34.6123" />
        </Field>
        <Field label="Longitude" htmlFor={`${id}-lon`} error={issue("lon")}>
          <Input id={`${id}-lon`} inputMode="decimal" value={spot.lon} onChange={(e) => onChange({ lon: e.target.value })} aria-invalid={!!issue("lon")} placeholder="-111.78" />
        </Field>
        <div className="flex items-end">
          <Button variant="secondary" className="w-full" onClick={onLocate} disabled={geo?.busy}>{geo?.busy ? "Locating…" : "Use my location"}</Button>
        </div>
      </div>
      {geo?.error ? <div className="mt-2"><Notice tone="warn">{geo.error}</Notice></div> : null}
      <div className="mt-3 grid gap-3 sm:grid-cols-2">
        <Field label="Time" htmlFor={`${id}-time`} error={issue("takenAt")} hint="Your device's local time; defaults to now.">
          <Input id={`${id}-time`} type="datetime-local" value={spot.time} onChange={(e) => onChange({ time: e.target.value })} aria-invalid={!!issue("takenAt")} />
        </Field>
        <Field label="Sky conditions" htmlFor={`${id}-cond`} error={issue("conditions")}>
          <Select id={`${id}-cond`} value={spot.conditions} onChange={(e) => onChange({ conditions: e.target.value })}>
            {CONDITIONS.map((c) => <option key={c} value={c}>{c}</option>)}
          </Select>
        </Field>
      </div>
      <fieldset className="mt-3">
        <legend className="text-sm font-bold">Readings at this spot (mag/arcsec²)</legend>
        {issue("readings") ? <p role="alert" className="text-sm text-danger">{issue("readings")}</p> : null}
        <div className="mt-1 grid grid-cols-2 gap-2 sm:grid-cols-4">
          {spot.readings.map((v, j) => {
            const err = issue(`readings.${j}`);
            return (
              <div key={j} className="flex flex-col gap-1">
                <label htmlFor={`${id}-r${j}`} className="sr-only">Spot {n}, reading {j + 1}</label>
                <div className="flex gap-1">
                  <Input
                    id={`${id}-r${j}`}
                    inputMode="decimal"
                    value={v}
                    placeholder={`#${j + 1}`}
                    onChange={(e) => onChange({ readings: spot.readings.map((x, k) => (k === j ? e.target.value : x)) })}
                    aria-invalid={!!err}
                    aria-describedby={err ? `${id}-r${j}-error` : undefined}
                  />
                  {spot.readings.length > 1 ? (
                    <Button size="sm" variant="ghost" className="min-h-11 px-2" aria-label={`Remove reading ${j + 1} of spot ${n}`} onClick={() => onChange({ readings: spot.readings.filter((_, k) => k !== j) })}>×</Button>
                  ) : null}
                </div>
                {err ? <p id={`${id}-r${j}-error`} role="alert" className="text-xs text-danger">{err}</p> : null}
              </div>
            );
          })}
        </div>
        <div className="mt-2 flex flex-wrap items-center gap-3">
          <Button size="sm" variant="secondary" onClick={() => onChange({ readings: [...spot.readings, ""] })}>Add a reading</Button>
          <p className="text-sm" aria-live="polite" data-testid={`spot-${n}-stats`}>
            {stats ? (
              <>
                Median <span className="font-mono font-bold">{stats.median.toFixed(2)}</span> of {stats.n}, spread (largest − smallest){" "}
                <span className={`font-mono font-bold ${stats.spread > 0.3 ? "text-warn" : ""}`}>{stats.spread.toFixed(2)}</span>
                {stats.spread > 0.3 ? " — large: did the sky or the aim change? Consider another reading." : ""}
              </>
            ) : (
              <span className="text-muted">Type the readings; the median and spread show here.</span>
            )}
          </p>
        </div>
      </fieldset>
      <div className="mt-3">
        <Field label="Notes for this spot" htmlFor={`${id}-notes`} error={issue("notes")}>
          <Input id={`${id}-notes`} value={spot.notes} onChange={(e) => onChange({ notes: e.target.value })} placeholder="e.g. porch light 200 m east" />
        </Field>
      </div>
    </li>
  );
}
