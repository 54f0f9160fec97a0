import { Card } from "@/components/ui/card";
import type { SiteSummary } from "@/lib/sites/service";
import { RAMP_BANDS } from "@/lib/map/ramp";
import { cn } from "@/lib/cn";

const SWATCH = ["bg-ramp-0", "bg-ramp-1", "bg-ramp-2", "bg-ramp-3", "bg-ramp-4", "bg-ramp-5", "bg-ramp-6"];

export type DarknessSummaryProps = { summary: SiteSummary };

/** The site's darkness now, in mag/arcsec² and in plain terms. */
export function DarknessSummary({ summary }: DarknessSummaryProps) {
  const d = summary.darkness;
  const s = summary.site;
  if (!d) {
    return (
      <Card>
        <h2 className="font-bold">Darkness now</h2>
        <p className="mt-2 text-muted">No usable nights yet. {summary.definitions.usableNight}</p>
      </Card>
    );
  }
  const band = RAMP_BANDS[d.rampClass];
  const t = summary.trend;
  return (
    <div className="grid gap-4 md:grid-cols-3">
      <Card className="md:col-span-1" aria-labelledby="darkness-now">
        <h2 id="darkness-now" className="text-sm font-bold text-muted">
          Darkness now
        </h2>
        <p className="mt-1 flex items-baseline gap-2">
          <span className="font-mono text-4xl font-bold tabular-nums" data-testid="darkness-now">
            {d.medianMag.toFixed(2)}
          </span>
          <span className="text-sm text-muted">mag/arcsec²</span>
        </p>
        <p className="mt-1 flex items-center gap-2 text-sm">
          <span className={cn("inline-block h-3 w-3 rounded-full border border-fg/60", SWATCH[d.rampClass])} aria-hidden />
          {band?.words} · spread (IQR) {d.iqrMag.toFixed(2)} mag ({d.q1Mag.toFixed(2)}–{d.q3Mag.toFixed(2)})
        </p>
        <p className="mt-1 text-sm text-muted">
          Median of the last {d.nights} usable nights, {d.firstNight} to {d.lastNight}.
        </p>
        <p className={cn("mt-2 text-sm font-bold", d.meetsTarget ? "text-ok" : "text-warn")}>
          {d.meetsTarget ? "✓ Meets" : "✗ Below"} the target of {s.targetMag.toFixed(2)} mag/arcsec²
          {d.meetsTarget ? "" : ` by ${(s.targetMag - d.medianMag).toFixed(2)} mag`}
        </p>
        {summary.lastNight ? (
          <p className="mt-1 text-sm text-muted">
            Last night ({summary.lastNight.night}): <span className="font-mono">{summary.lastNight.mag.toFixed(2)}</span> from {summary.lastNight.stations}{" "}
            station{summary.lastNight.stations === 1 ? "" : "s"}
          </p>
        ) : null}
      </Card>
      <Card aria-labelledby="plain-terms">
        <h2 id="plain-terms" className="text-sm font-bold text-muted">
          In plain terms
        </h2>
        <dl className="mt-2 grid grid-cols-[1fr_auto] gap-x-4 gap-y-2 text-sm">
          <dt>Sky luminance</dt>
          <dd className="text-right font-mono tabular-nums">{d.plain.luminanceMcdM2.toFixed(3)} mcd/m²</dd>
          <dt>Brightness vs a natural sky ({s.naturalSkyMag.toFixed(1)})</dt>
          <dd className="text-right font-mono tabular-nums">× {d.plain.ratioToNatural.toFixed(2)}</dd>
          <dt>Artificial light, % of natural</dt>
          <dd className="text-right font-mono tabular-nums">{d.plain.artificialPercent.toFixed(0)} %</dd>
          <dt>Faintest star to the naked eye</dt>
          <dd className="text-right font-mono tabular-nums">mag {d.plain.nelm.toFixed(1)}</dd>
          <dt>Bortle class (approximate)</dt>
          <dd className="text-right font-mono tabular-nums">~{d.plain.bortleApprox.label}</dd>
        </dl>
      </Card>
      <Card aria-labelledby="trend-title">
        <h2 id="trend-title" className="text-sm font-bold text-muted">
          Long-term trend
        </h2>
        {t.ok ? (
          <>
            <p className="mt-1 font-mono text-2xl font-bold tabular-nums">
              {t.slopeMagPerYear >= 0 ? "+" : "−"}
              {Math.abs(t.slopeMagPerYear).toFixed(3)} <span className="text-sm font-normal text-muted">mag/arcsec² per year</span>
            </p>
            <p className="mt-1 text-sm">
              {Math.abs(t.brighteningPercentPerYear) < 0.05
                ? "No change in brightness"
                : `${Math.abs(t.brighteningPercentPerYear).toFixed(1)} % ${t.brighteningPercentPerYear > 0 ? "brighter" : "darker"} per year`}
              {t.p < 0.05 ? " (significant, " : " (not significant, "}p = {t.p < 0.001 ? "< 0.001" : t.p.toFixed(3)})
            </p>
            <p className="mt-1 text-xs text-muted">
              Theil–Sen slope, 95 % interval {t.lowerMagPerYear.toFixed(3)} to {t.upperMagPerYear.toFixed(3)}; Mann–Kendall Z = {t.mannKendallZ.toFixed(2)} over{" "}
              {t.nights} nights.
            </p>
          </>
        ) : (
          <p className="mt-2 text-sm text-muted">{t.reason}</p>
        )}
      </Card>
    </div>
  );
}
