import Link from "next/link";
import type { SiteProps, StationProps } from "@/lib/map/layers";
import { RAMP_BANDS } from "@/lib/map/ramp";

const fmt = (v: number | null, d = 2) => (v === null ? "—" : v.toFixed(d));

function band(c: number | null) {
  return c === null ? "no data" : (RAMP_BANDS[c]?.words ?? "");
}

export function StationPopupBody({ p, periodLabel }: { p: StationProps; periodLabel: string }) {
  return (
    <div className="min-w-52 text-sm" data-testid="map-popup" data-kind="station">
      <p className="font-bold">{p.name}</p>
      <p className="text-xs text-muted">
        Station{p.siteName ? ` · ${p.siteName}` : ""}
        {p.status === "retired" ? " · retired" : ""}
        {p.approval === "pending" ? " · awaiting approval" : ""}
      </p>
      <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-3 gap-y-1">
        <dt className="text-muted">{periodLabel === "Last 30 usable nights" ? "30-night median" : `Median, ${periodLabel}`}</dt>
        <dd className="font-mono tabular-nums">
          {fmt(p.medianMag)} <span className="text-xs text-muted">mag/arcsec² · {band(p.rampClass)}</span>
        </dd>
        <dt className="text-muted">Last night</dt>
        <dd className="font-mono tabular-nums">
          {fmt(p.lastNightMag)} <span className="text-xs text-muted">{p.lastNight ?? ""}</span>
        </dd>
        <dt className="text-muted">Nights</dt>
        <dd className="font-mono tabular-nums">{p.nights}</dd>
      </dl>
      <Link href={`/stations/${p.slug}`} className="mt-2 inline-flex min-h-11 items-center font-bold text-accent underline">
        Station page →
      </Link>
    </div>
  );
}

export function SitePopupBody({ p, periodLabel }: { p: SiteProps; periodLabel: string }) {
  return (
    <div className="min-w-52 text-sm" data-testid="map-popup" data-kind="site">
      <p className="font-bold">{p.name}</p>
      <p className="text-xs text-muted">Site · {p.isPublic ? "public" : "private"} · target {p.targetMag.toFixed(1)}</p>
      <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-3 gap-y-1">
        <dt className="text-muted">{periodLabel === "Last 30 usable nights" ? "Darkness now" : `Median, ${periodLabel}`}</dt>
        <dd className="font-mono tabular-nums">
          {fmt(p.medianMag)} <span className="text-xs text-muted">mag/arcsec²</span>
        </dd>
        <dt className="text-muted">Spread (IQR)</dt>
        <dd className="font-mono tabular-nums">{p.q1Mag !== null && p.q3Mag !== null ? (p.q3Mag - p.q1Mag).toFixed(2) : "—"}</dd>
        <dt className="text-muted">Last night</dt>
        <dd className="font-mono tabular-nums">
          {fmt(p.lastNightMag)} <span className="text-xs text-muted">{p.lastNight ?? ""}</span>
        </dd>
        <dt className="text-muted">Nights</dt>
        <dd className="font-mono tabular-nums">{p.nights}</dd>
      </dl>
      <Link href={`/sites/${p.slug}`} className="mt-2 inline-flex min-h-11 items-center font-bold text-accent underline">
        Site page →
      </Link>
    </div>
  );
}
