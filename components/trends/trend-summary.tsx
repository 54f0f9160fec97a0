import type { BaselineComparison, SiteTrendResult } from "@/lib/trends/site-trend";
import { cn } from "@/lib/cn";

export type TrendSummaryProps = {
  trend: SiteTrendResult;
  baseline?: BaselineComparison | null;
  /** Heading level text; defaults to "Trend". */
  title?: string;
  className?: string;
};

const signed = (v: number, digits = 3) =>
  `${v > 0 ? "+" : v < 0 ? "−" : ""}${Math.abs(v).toFixed(digits)}`;
const pct = (v: number) =>
  `${Math.abs(v) < 10 ? Math.abs(v).toFixed(1) : Math.abs(v).toFixed(0)} %`;
const pText = (p: number) => (p < 0.0001 ? "p < 0.0001" : `p = ${p.toPrecision(2)}`);

/**
 * A site's trend and baseline comparison in words and numbers (server-renderable, no client code).
 * Props are lib/trends/site-trend.ts results: siteTrend(...) and compareWithBaseline(...).
 */
export function TrendSummary({ trend, baseline, title = "Trend", className }: TrendSummaryProps) {
  return (
    <section
      aria-labelledby="trend-summary-title"
      className={cn("rounded-card border-line bg-surface border p-4 sm:p-6", className)}
    >
      <h2 id="trend-summary-title" className="text-lg font-bold">
        {title}
      </h2>
      {trend.status === "not-enough" ? (
        <p className="text-muted mt-2" data-testid="trend-not-enough">
          {trend.message}
        </p>
      ) : (
        <>
          <p className="mt-2 text-2xl font-bold">
            <span className="font-mono">{signed(trend.slopeMagPerYear)}</span> mag/arcsec² per year
          </p>
          <p className="text-muted">
            {Math.round((1 - trend.alpha) * 100)} % interval{" "}
            <span className="font-mono">{signed(trend.lowerMagPerYear)}</span> to{" "}
            <span className="font-mono">{signed(trend.upperMagPerYear)}</span>
          </p>
          <p className="mt-2">
            {trend.slopeMagPerYear < 0 ? (
              <>
                About <strong>{pct(trend.brighteningPercentPerYear)} brighter a year</strong> (
                {pct(trend.brighteningPercentLower)} to {pct(trend.brighteningPercentUpper)}).
              </>
            ) : (
              <>
                About <strong>{pct(trend.brighteningPercentPerYear)} darker a year</strong>.
              </>
            )}
          </p>
          <p
            className={cn(
              "mt-2 text-sm",
              trend.direction === "brightening" ? "text-warn" : "text-muted",
            )}
          >
            {trend.significant
              ? `Statistically significant (Mann–Kendall ${pText(trend.mannKendall.p)}, α = ${trend.alpha}): the sky is getting ${trend.direction === "brightening" ? "brighter" : "darker"}.`
              : `Not statistically significant (Mann–Kendall ${pText(trend.mannKendall.p)}, α = ${trend.alpha}): no clear trend yet.`}
          </p>
          <dl className="mt-3 grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
            <dt className="text-muted">Nights</dt>
            <dd>
              {trend.nights} usable nights in {trend.months} months, {trend.firstNight} to{" "}
              {trend.lastNight}
            </dd>
            {trend.seasonal ? (
              <>
                <dt className="text-muted">Seasonal Kendall</dt>
                <dd>
                  <span className="font-mono">{signed(trend.seasonal.slopeMagPerYear)}</span>{" "}
                  mag/arcsec² per year, {pText(trend.seasonal.p)} (seasons = calendar months)
                </dd>
              </>
            ) : null}
          </dl>
        </>
      )}
      {baseline ? (
        <div className="border-line mt-4 border-t pt-3">
          <h3 className="font-bold">Against the baseline</h3>
          {baseline.status === "ok" ? (
            <p className="mt-1">
              The last {baseline.recent.nights} usable nights ({baseline.recent.from} to{" "}
              {baseline.recent.to}) have a median of{" "}
              <span className="font-mono">{baseline.recent.medianMag.toFixed(2)}</span>,{" "}
              <strong>
                <span className="font-mono">{signed(baseline.diffMag, 2)}</span> mag (
                {pct(baseline.brighterPercent)} {baseline.diffMag < 0 ? "brighter" : "darker"})
              </strong>{" "}
              than {baseline.baseline.label} (
              <span className="font-mono">{baseline.baseline.medianMag.toFixed(2)}</span>,{" "}
              {baseline.baseline.nights} nights).
            </p>
          ) : (
            <p className="text-muted mt-1">{baseline.message}</p>
          )}
        </div>
      ) : null}
      <p className="text-muted mt-3 text-xs">
        Theil–Sen slope of nightly site values with the Mann–Kendall test. A negative change in
        mag/arcsec² means a brighter sky.
      </p>
    </section>
  );
}
