"use client";

import Link from "next/link";
import { useActionState } from "react";
import { Button, buttonVariants } from "@/components/ui/button";
import { Card, Notice } from "@/components/ui/card";
import { Field, Input, Select, Textarea } from "@/components/ui/input";
import { updateSiteAction, type EditSiteState } from "./actions";

type Initial = {
  name: string;
  description: string;
  timeZone: string;
  targetMag: number;
  sunMaxAltDeg: number;
  moonMaxAltDeg: number;
  cloudWindowMin: number;
  cloudSpreadMag: number;
  isPublic: boolean;
  roundPublicPositions: boolean;
  lightingZone: string | null;
  boundaryType: string;
};

const ZONES = [
  ["E0", "E0 — intrinsically dark"],
  ["E1", "E1 — dark (relatively uninhabited rural)"],
  ["E2", "E2 — low district brightness"],
  ["E3", "E3 — medium district brightness"],
  ["E4", "E4 — high district brightness (town and city centres)"],
] as const;

export function EditSiteForm({ slug, initial, timeZones }: { slug: string; initial: Initial; timeZones: string[] }) {
  const [state, action, pending] = useActionState<EditSiteState, FormData>(updateSiteAction.bind(null, slug), {
    ok: true,
    fieldErrors: {},
    boundaryErrors: [],
  });
  const e = state.fieldErrors;
  const num = (name: keyof Initial, label: string, hint: string, step: string) => (
    <Field label={label} htmlFor={name} error={e[name]} hint={hint}>
      <Input id={name} name={name} type="number" inputMode="decimal" step={step} defaultValue={String(initial[name])} aria-invalid={!!e[name]} required />
    </Field>
  );
  return (
    <form action={action} className="flex flex-col gap-4" encType="multipart/form-data">
      {state.message ? <Notice tone="danger">{state.message}</Notice> : null}
      <Card className="flex flex-col gap-4">
        <h2 className="font-bold">The site</h2>
        <Field label="Name" htmlFor="name" error={e.name}>
          <Input id="name" name="name" defaultValue={initial.name} aria-invalid={!!e.name} required />
        </Field>
        <Field label="Description" htmlFor="description" error={e.description}>
          <Textarea id="description" name="description" rows={3} defaultValue={initial.description} />
        </Field>
        <Field label="Time zone (IANA)" htmlFor="timeZone" error={e.timeZone} hint="Nights are named by their evening date in this zone.">
          <Input id="timeZone" name="timeZone" list="tz-list" defaultValue={initial.timeZone} aria-invalid={!!e.timeZone} required />
        </Field>
        <datalist id="tz-list">
          {timeZones.map((z) => (
            <option key={z} value={z} />
          ))}
        </datalist>
        {num("targetMag", "Target darkness (mag/arcsec²)", "Alerts compare the site with this; bigger = darker.", "0.01")}
        <Field label="Lighting zone (CIE 150:2017)" htmlFor="lightingZone" error={e.lightingZone}>
          <Select id="lightingZone" name="lightingZone" defaultValue={initial.lightingZone ?? ""}>
            <option value="">Not set</option>
            {ZONES.map(([v, l]) => (
              <option key={v} value={v}>
                {l}
              </option>
            ))}
          </Select>
        </Field>
      </Card>
      <Card className="flex flex-col gap-4">
        <h2 className="font-bold">Boundary</h2>
        <p className="text-sm text-muted">Now a {initial.boundaryType}. Upload a GeoJSON file to replace it (Polygon or MultiPolygon, longitude/latitude, closed rings).</p>
        <Field label="Boundary file (.geojson, .json)" htmlFor="boundary" hint="Leave empty to keep the current boundary.">
          <Input id="boundary" name="boundary" type="file" accept=".geojson,.json,application/geo+json,application/json" className="py-2" />
        </Field>
        {state.boundaryErrors.length > 0 ? (
          <Notice tone="danger" title="The boundary file was not accepted">
            <ul className="list-disc pl-5" data-testid="boundary-errors">
              {state.boundaryErrors.map((m) => (
                <li key={m}>{m}</li>
              ))}
            </ul>
          </Notice>
        ) : null}
      </Card>
      <Card className="grid gap-4 sm:grid-cols-2">
        <h2 className="font-bold sm:col-span-2">Screening thresholds</h2>
        {num("sunMaxAltDeg", "Sun below (°)", "−18 is astronomical night.", "0.1")}
        {num("moonMaxAltDeg", "Moon below (°)", "0 is the horizon; studies use 0, −5 or −10.", "0.1")}
        {num("cloudWindowMin", "Cloud window (minutes)", "Moving window for the spread test.", "1")}
        {num("cloudSpreadMag", "Cloud spread (mag)", "Spread above this in the window = cloud-suspect.", "0.01")}
      </Card>
      <Card className="flex flex-col gap-3">
        <h2 className="font-bold">Public page</h2>
        <label className="flex min-h-11 items-center gap-3">
          <input type="checkbox" name="isPublic" defaultChecked={initial.isPublic} className="h-5 w-5 accent-[rgb(var(--nm-accent))]" />
          <span>Public: anyone can read this site&apos;s page at /s/{slug} (no names or e-mails are shown).</span>
        </label>
        <label className="flex min-h-11 items-center gap-3">
          <input type="checkbox" name="roundPublicPositions" defaultChecked={initial.roundPublicPositions} className="h-5 w-5 accent-[rgb(var(--nm-accent))]" />
          <span>Round station positions to about 1 km on the public page.</span>
        </label>
      </Card>
      <div className="flex flex-wrap gap-3">
        <Button type="submit" disabled={pending}>
          {pending ? "Saving…" : "Save changes"}
        </Button>
        <Link href={`/sites/${slug}`} className={buttonVariants({ variant: "secondary" })}>
          Cancel
        </Link>
      </div>
    </form>
  );
}
