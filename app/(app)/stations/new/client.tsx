"use client";

import dynamic from "next/dynamic";
import Link from "next/link";
import { useActionState, useState } from "react";
import { Button, buttonVariants } from "@/components/ui/button";
import { Card, Notice } from "@/components/ui/card";
import { Field, Input, Textarea } from "@/components/ui/input";
import type { PickerSite } from "@/components/stations/position-picker";
import { pointInPolygon } from "@/lib/geo/point-in-polygon";
import { timeZoneAt } from "@/lib/geo/time-zone";
import type { FormState } from "@/lib/people/form-state";
import { registerStationAction, type RegisteredStation } from "./actions";

const PositionPicker = dynamic(() => import("@/components/stations/position-picker").then((m) => m.PositionPicker), {
  ssr: false,
  loading: () => (
    <p role="status" className="flex h-72 items-center justify-center rounded-card border border-line text-muted sm:h-96">
      Loading the map…
    </p>
  ),
});

export function RegisterStationForm({ sites }: { sites: PickerSite[] }) {
  const [state, action, pending] = useActionState(registerStationAction, {} as FormState<RegisteredStation>);
  const [lat, setLat] = useState("");
  const [lon, setLon] = useState("");
  const [tz, setTz] = useState("");
  const [tzEdited, setTzEdited] = useState(false);
  const [locating, setLocating] = useState(false);
  const [geoError, setGeoError] = useState<string>();
  const fe = state.fieldErrors ?? {};
  const latN = lat.trim() === "" ? null : Number(lat);
  const lonN = lon.trim() === "" ? null : Number(lon);
  const valid = latN !== null && lonN !== null && Number.isFinite(latN) && Number.isFinite(lonN) && Math.abs(latN) <= 90 && Math.abs(lonN) <= 180;
  const inside = valid ? sites.find((s) => pointInPolygon(lonN!, latN!, s.boundary)) : undefined;

  function place(la: number, lo: number) {
    setLat(String(la));
    setLon(String(lo));
    if (!tzEdited) setTz(timeZoneAt(la, lo) ?? "");
  }
  function typed(which: "lat" | "lon", v: string) {
    if (which === "lat") setLat(v);
    else setLon(v);
    const la = Number(which === "lat" ? v : lat);
    const lo = Number(which === "lon" ? v : lon);
    if (!tzEdited && v.trim() !== "" && Number.isFinite(la) && Number.isFinite(lo)) setTz(timeZoneAt(la, lo) ?? "");
  }
  function locate() {
    setGeoError(undefined);
    if (!navigator.geolocation) return setGeoError("This browser cannot share its location; click the map or type the position.");
    setLocating(true);
    navigator.geolocation.getCurrentPosition(
      (p) => {
        setLocating(false);
        place(Math.round(p.coords.latitude * 1e6) / 1e6, Math.round(p.coords.longitude * 1e6) / 1e6);
      },
      () => {
        setLocating(false);
        setGeoError("The location was not shared; click the map or type the position.");
      },
      { enableHighAccuracy: true, timeout: 15_000 },
    );
  }

  if (state.ok && state.data) {
    return (
      <Card>
        <Notice tone="ok" title="Station registered">
          {state.ok}
        </Notice>
        <p className="mt-4 text-sm text-muted">Next, create a station token on the station&apos;s page and give it to the meter or its logger.</p>
        <div className="mt-4 flex flex-wrap gap-3">
          <Link href={`/stations/${state.data.slug}`} className={buttonVariants()}>
            Open the station
          </Link>
          <Link href="/stations/new" className={buttonVariants({ variant: "secondary" })} onClick={() => window.location.reload()}>
            Register another
          </Link>
        </div>
      </Card>
    );
  }

  const err = (k: string) => (fe[k] ? { "aria-invalid": true, "aria-describedby": `${k}-error` } : {});
  return (
    <form action={action} className="flex flex-col gap-6" noValidate>
      {state.error && !state.fieldErrors ? <Notice tone="danger">{state.error}</Notice> : null}
      {state.fieldErrors ? <Notice tone="danger">Check the highlighted fields.</Notice> : null}
      <Card>
        <fieldset className="flex flex-col gap-4">
          <legend className="mb-2 font-bold">Where it is</legend>
          <PositionPicker lat={valid ? latN : null} lon={valid ? lonN : null} sites={sites} onPick={place} />
          <div className="grid gap-4 sm:grid-cols-2">
            <Field label="Latitude (°, north positive)" htmlFor="lat" error={fe.lat}>
              <Input id="lat" name="lat" inputMode="decimal" value={lat} onChange={(e) => typed("lat", e.target.value)} required {...err("lat")} />
            </Field>
            <Field label="Longitude (°, east positive)" htmlFor="lon" error={fe.lon}>
              <Input id="lon" name="lon" inputMode="decimal" value={lon} onChange={(e) => typed("lon", e.target.value)} required {...err("lon")} />
            </Field>
          </div>
          <div className="flex flex-wrap items-center gap-3">
            <Button type="button" variant="secondary" onClick={locate} disabled={locating}>
              {locating ? "Finding you…" : "Use this device's location"}
            </Button>
            {geoError ? <span className="text-sm text-warn">{geoError}</span> : null}
          </div>
          <p aria-live="polite" className="text-sm">
            {!valid ? (
              <span className="text-muted">Click the map or type the position.</span>
            ) : inside ? (
              <>
                Inside <strong>{inside.name}</strong>: its stewards approve the station before its readings count toward the site. Readings are
                kept meanwhile.
              </>
            ) : (
              <span className="text-muted">Outside every site&apos;s boundary: no approval needed.</span>
            )}
          </p>
          <Field label="Elevation (m, optional)" htmlFor="elevationM" error={fe.elevationM}>
            <Input id="elevationM" name="elevationM" defaultValue={state.values?.elevationM} inputMode="decimal" {...err("elevationM")} />
          </Field>
          <Field label="Time zone" htmlFor="timeZone" error={fe.timeZone} hint="Found from the position; change it if it is wrong. Nights are named in this zone.">
            <Input
              id="timeZone"
              name="timeZone"
              value={tz}
              onChange={(e) => {
                setTz(e.target.value);
                setTzEdited(true);
              }}
              aria-invalid={!!fe.timeZone}
              aria-describedby={fe.timeZone ? "timeZone-error" : "timeZone-hint"}
            />
          </Field>
        </fieldset>
      </Card>
      <Card>
        <fieldset className="flex flex-col gap-4">
          <legend className="mb-2 font-bold">The meter</legend>
          <Field label="Station name" htmlFor="name" error={fe.name} hint="What you call this spot, e.g. “Back garden, north fence”.">
            <Input id="name" name="name" defaultValue={state.values?.name} required maxLength={80} aria-invalid={!!fe.name} aria-describedby={fe.name ? "name-error" : "name-hint"} />
          </Field>
          <Field label="Device" htmlFor="deviceDescription" error={fe.deviceDescription} hint="Make, model, housing, how it is mounted.">
            <Textarea
              id="deviceDescription"
              name="deviceDescription"
              defaultValue={state.values?.deviceDescription}
              rows={3}
              maxLength={500}
              aria-invalid={!!fe.deviceDescription}
              aria-describedby={fe.deviceDescription ? "deviceDescription-error" : "deviceDescription-hint"}
            />
          </Field>
          <Field label="Field of view (degrees, optional)" htmlFor="fieldOfViewDeg" error={fe.fieldOfViewDeg} hint="Full width of the cone the meter sees, e.g. 20.">
            <Input
              id="fieldOfViewDeg"
              name="fieldOfViewDeg"
              defaultValue={state.values?.fieldOfViewDeg}
              inputMode="decimal"
              aria-invalid={!!fe.fieldOfViewDeg}
              aria-describedby={fe.fieldOfViewDeg ? "fieldOfViewDeg-error" : "fieldOfViewDeg-hint"}
            />
          </Field>
        </fieldset>
      </Card>
      <Button type="submit" disabled={pending} className="self-start">
        {pending ? "Registering…" : "Register the station"}
      </Button>
    </form>
  );
}
