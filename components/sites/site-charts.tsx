"use client";

/**
 * The site page's charts (recharts, client side): nightly values with the target and the Theil–Sen
 * trend, the same months across years, the distribution of usable nightly values, and a night-by-hour
 * grid of one month. Colours are design tokens read at run time (night mode turns them red).
 */
import { useQuery } from "@tanstack/react-query";
import { useMemo, useState } from "react";
import {
  Bar,
  BarChart,
  CartesianGrid,
  ComposedChart,
  Legend,
  Line,
  LineChart,
  ReferenceLine,
  ResponsiveContainer,
  Scatter,
  Tooltip,
  XAxis,
  YAxis,
} from "recharts";
import { useThemeTokens, type ThemeTokens } from "@/components/map/use-theme-tokens";
import { Card, EmptyState, Notice } from "@/components/ui/card";
import { Field, Select } from "@/components/ui/input";
import { rampClass, RAMP_BANDS } from "@/lib/map/ramp";
import { queryKeys } from "@/lib/query-keys";
import type { HourCell, SiteTrend } from "@/lib/sites/service";
import { median } from "@/lib/stats/robust";

type Night = { night: string; mag: number; stations: number };
type NightsBody = { site: { slug: string; targetMag: number; timeZone: string }; nights: Night[]; trend: SiteTrend };
type HoursBody = { month: string; cells: HourCell[]; site: { timeZone: string } };

const MONTHS = ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"];
const DAY_MS = 86_400_000;
const dayMs = (night: string) => Date.parse(`${night}T00:00:00Z`);
const fmtDate = (ms: number) => new Date(ms).toISOString().slice(0, 10);

async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { cache: "no-store" });
  const body = await res.json();
  if (!res.ok) throw new Error(body?.error?.message ?? `Request failed (${res.status})`);
  return body as T;
}

function axisProps(t: ThemeTokens) {
  return { stroke: t.color.muted, tick: { fill: t.color.muted, fontSize: 12 } };
}

function tooltipProps(t: ThemeTokens) {
  return {
    contentStyle: { background: t.color.surface, border: `1px solid ${t.color.line}`, color: t.color.fg },
    labelStyle: { color: t.color.fg },
    itemStyle: { color: t.color.fg },
  };
}

export type SiteChartsProps = { slug: string; publicView: boolean; targetMag: number };

export function SiteCharts({ slug, publicView, targetMag }: SiteChartsProps) {
  const t = useThemeTokens();
  const view = publicView ? "public" : undefined;
  const nightsQ = useQuery({
    queryKey: queryKeys.siteNights(slug, { view }),
    queryFn: () => getJson<NightsBody>(`/api/v1/sites/${slug}/nights${view ? "?view=public" : ""}`),
  });
  const nights = nightsQ.data?.nights ?? [];
  const months = useMemo(() => [...new Set(nights.map((n) => n.night.slice(0, 7)))].sort().reverse(), [nights]);

  if (nightsQ.error) return <Notice tone="danger" title="The charts did not load">{(nightsQ.error as Error).message}</Notice>;
  if (!t || nightsQ.isPending) return <p className="text-muted" aria-busy="true">Loading charts…</p>;
  if (nights.length === 0) return <EmptyState title="No usable nights yet">Charts appear once the site&apos;s stations report usable nights.</EmptyState>;

  return (
    <div className="grid gap-4 lg:grid-cols-2" data-testid="site-charts">
      <Card className="lg:col-span-2">
        <h2 className="font-bold">Nightly site values</h2>
        <p className="text-sm text-muted">One point per night (median of the approved stations&apos; night medians), the target, and the Theil–Sen trend.</p>
        <NightlyChart t={t} nights={nights} trend={nightsQ.data!.trend} targetMag={targetMag} />
      </Card>
      <Card>
        <h2 className="font-bold">Same months, year by year</h2>
        <p className="text-sm text-muted">Median of each month&apos;s nightly values; one line per year.</p>
        <SeasonChart t={t} nights={nights} />
      </Card>
      <Card>
        <h2 className="font-bold">Distribution of usable nights</h2>
        <p className="text-sm text-muted">How many nights had each site value (bins of 0.1 mag/arcsec²; nightly values, not single readings).</p>
        <Histogram t={t} nights={nights} targetMag={targetMag} />
      </Card>
      <Card className="lg:col-span-2">
        <HourGrid t={t} slug={slug} view={view} months={months} />
      </Card>
    </div>
  );
}

function NightlyChart({ t, nights, trend, targetMag }: { t: ThemeTokens; nights: Night[]; trend: SiteTrend; targetMag: number }) {
  const data = useMemo(
    () =>
      nights.map((n) => {
        const x = dayMs(n.night);
        const trendMag = trend.ok ? trend.interceptMag + trend.slopeMagPerYear * (x / DAY_MS / 365.25) : undefined;
        return { x, mag: n.mag, trend: trendMag, stations: n.stations };
      }),
    [nights, trend],
  );
  const mags = nights.map((n) => n.mag);
  const lo = Math.floor((Math.min(...mags, targetMag) - 0.1) * 10) / 10;
  const hi = Math.ceil((Math.max(...mags, targetMag) + 0.1) * 10) / 10;
  return (
    <div className="mt-3 h-72" data-chart="nightly">
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={data} margin={{ top: 8, right: 16, bottom: 8, left: 0 }}>
          <CartesianGrid stroke={t.color.line} strokeDasharray="3 3" />
          <XAxis dataKey="x" type="number" scale="time" domain={["dataMin", "dataMax"]} tickFormatter={(v: number) => fmtDate(v).slice(0, 7)} {...axisProps(t)} />
          <YAxis domain={[lo, hi]} tickFormatter={(v: number) => v.toFixed(1)} width={48} {...axisProps(t)} label={{ value: "mag/arcsec²", angle: -90, position: "insideLeft", fill: t.color.muted, fontSize: 12 }} />
          <Tooltip
            {...tooltipProps(t)}
            labelFormatter={(v) => `Night of ${fmtDate(Number(v))}`}
            formatter={(v, name) => [typeof v === "number" ? v.toFixed(2) : String(v), name === "trend" ? "Trend" : "Site value"]}
          />
          <ReferenceLine y={targetMag} stroke={t.color.warn} strokeDasharray="6 4" label={{ value: `target ${targetMag.toFixed(1)}`, fill: t.color.warn, fontSize: 12, position: "insideTopRight" }} />
          <Scatter dataKey="mag" name="Site value" fill={t.color.accent} shape="circle" isAnimationActive={false} r={2} />
          {trend.ok ? <Line dataKey="trend" name="trend" stroke={t.color.fg} strokeWidth={2} dot={false} isAnimationActive={false} /> : null}
        </ComposedChart>
      </ResponsiveContainer>
    </div>
  );
}

const DASHES = ["", "6 3", "2 3", "10 3 2 3", "1 2"];

function SeasonChart({ t, nights }: { t: ThemeTokens; nights: Night[] }) {
  const { data, years } = useMemo(() => {
    const groups = new Map<string, number[]>();
    for (const n of nights) {
      const key = n.night.slice(0, 7);
      const arr = groups.get(key) ?? [];
      arr.push(n.mag);
      groups.set(key, arr);
    }
    const years = [...new Set(nights.map((n) => n.night.slice(0, 4)))].sort();
    const data = MONTHS.map((m, i) => {
      const row: Record<string, number | string> = { month: m };
      for (const y of years) {
        const v = groups.get(`${y}-${String(i + 1).padStart(2, "0")}`);
        if (v && v.length > 0) row[y] = median(v);
      }
      return row;
    });
    return { data, years };
  }, [nights]);
  const colours = [t.ramp[2]!, t.ramp[4]!, t.color.accent!, t.ramp[1]!, t.color.fg!];
  return (
    <div className="mt-3 h-64" data-chart="seasons">
      <ResponsiveContainer width="100%" height="100%">
        <LineChart data={data} margin={{ top: 8, right: 16, bottom: 8, left: 0 }}>
          <CartesianGrid stroke={t.color.line} strokeDasharray="3 3" />
          <XAxis dataKey="month" {...axisProps(t)} />
          <YAxis domain={["auto", "auto"]} tickFormatter={(v: number) => v.toFixed(2)} width={48} {...axisProps(t)} />
          <Tooltip {...tooltipProps(t)} formatter={(v) => (typeof v === "number" ? v.toFixed(2) : String(v))} />
          <Legend wrapperStyle={{ color: t.color.fg }} />
          {years.map((y, i) => (
            <Line key={y} dataKey={y} name={y} stroke={colours[i % colours.length]} strokeDasharray={DASHES[i % DASHES.length]} strokeWidth={2} connectNulls isAnimationActive={false} dot={{ r: 3 }} />
          ))}
        </LineChart>
      </ResponsiveContainer>
    </div>
  );
}

function Histogram({ t, nights, targetMag }: { t: ThemeTokens; nights: Night[]; targetMag: number }) {
  const data = useMemo(() => {
    const bins = new Map<number, number>();
    for (const n of nights) {
      const b = Math.floor(n.mag * 10 + 1e-9);
      bins.set(b, (bins.get(b) ?? 0) + 1);
    }
    const keys = [...bins.keys()];
    const lo = Math.min(...keys);
    const hi = Math.max(...keys);
    const out = [];
    for (let b = lo; b <= hi; b++) out.push({ bin: (b / 10).toFixed(1), from: b / 10, nights: bins.get(b) ?? 0 });
    return out;
  }, [nights]);
  return (
    <div className="mt-3 h-64" data-chart="histogram">
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} margin={{ top: 8, right: 16, bottom: 8, left: 0 }}>
          <CartesianGrid stroke={t.color.line} strokeDasharray="3 3" />
          <XAxis dataKey="bin" {...axisProps(t)} />
          <YAxis allowDecimals={false} width={40} {...axisProps(t)} />
          <Tooltip {...tooltipProps(t)} labelFormatter={(v) => `${v}–${(Number(v) + 0.1).toFixed(1)} mag/arcsec²`} formatter={(v) => [String(v), "nights"]} />
          <ReferenceLine x={targetMag.toFixed(1)} stroke={t.color.warn} strokeDasharray="6 4" />
          <Bar dataKey="nights" fill={t.color.accent} isAnimationActive={false} />
        </BarChart>
      </ResponsiveContainer>
    </div>
  );
}

/** Local hours of a night in order, evening to morning. */
const NIGHT_HOURS = [...Array.from({ length: 12 }, (_, i) => 12 + i), ...Array.from({ length: 12 }, (_, i) => i)];

function HourGrid({ t, slug, view, months }: { t: ThemeTokens; slug: string; view?: string; months: string[] }) {
  const [month, setMonth] = useState(months[0] ?? "");
  const q = useQuery({
    queryKey: [...queryKeys.site(slug), "hours", { month, view }],
    queryFn: () => getJson<HoursBody>(`/api/v1/sites/${slug}/hours?month=${month}${view ? "&view=public" : ""}`),
    enabled: !!month,
  });
  const cells = q.data?.cells ?? [];
  const hours = NIGHT_HOURS.filter((h) => cells.some((c) => c.hour === h));
  const nightsInMonth = [...new Set(cells.map((c) => c.night))].sort();
  const byKey = new Map(cells.map((c) => [`${c.night}|${c.hour}`, c]));
  const cw = 28;
  const ch = 14;
  const left = 74;
  const top = 22;
  return (
    <div>
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h2 className="font-bold">Night by hour</h2>
          <p className="text-sm text-muted">
            Median of usable readings in each local hour ({q.data?.site.timeZone ?? "site time"}) for one month; darker cell = darker sky.
          </p>
        </div>
        <div className="w-48">
          <Field label="Month" htmlFor="hour-month">
            <Select id="hour-month" value={month} onChange={(e) => setMonth(e.target.value)}>
              {months.map((m) => (
                <option key={m} value={m}>
                  {m}
                </option>
              ))}
            </Select>
          </Field>
        </div>
      </div>
      {q.isPending && month ? <p className="mt-3 text-muted">Loading…</p> : null}
      {q.error ? <Notice tone="danger">{(q.error as Error).message}</Notice> : null}
      {q.data && cells.length === 0 ? <p className="mt-3 text-muted">No usable readings in {month}.</p> : null}
      {cells.length > 0 ? (
        <div className="mt-3 overflow-x-auto" data-chart="hours">
          <svg width={left + hours.length * cw + 8} height={top + nightsInMonth.length * ch + 4} role="img" aria-label={`Hourly medians for ${month}`}>
            {hours.map((h, i) => (
              <text key={h} x={left + i * cw + cw / 2} y={14} textAnchor="middle" fontSize={11} fill={t.color.muted}>
                {String(h).padStart(2, "0")}
              </text>
            ))}
            {nightsInMonth.map((n, r) => (
              <g key={n}>
                <text x={left - 6} y={top + r * ch + ch - 3} textAnchor="end" fontSize={11} fill={t.color.muted}>
                  {n.slice(5)}
                </text>
                {hours.map((h, i) => {
                  const c = byKey.get(`${n}|${h}`);
                  if (!c) return null;
                  const cls = rampClass(c.mag);
                  return (
                    <rect key={h} x={left + i * cw} y={top + r * ch} width={cw - 2} height={ch - 2} fill={t.ramp[cls]} stroke={t.color.bg} strokeWidth={0.5}>
                      <title>{`${n} ${String(h).padStart(2, "0")}:00 — ${c.mag.toFixed(2)} mag/arcsec² (${RAMP_BANDS[cls]?.words}), ${c.readings} readings, ${c.stations} station(s)`}</title>
                    </rect>
                  );
                })}
              </g>
            ))}
          </svg>
        </div>
      ) : null}
    </div>
  );
}
