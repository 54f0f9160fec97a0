"use client";

/**
 * One night of a station: sky brightness against LOCAL time in the station's zone (larger mag/arcsec²,
 * a darker sky, is higher), Sun and Moon altitude on a second axis, shaded. Every reading is drawn
 * with the colour AND the shape of its screening outcome (the legend names them), so the meaning does
 * not rest on colour alone (and survives the red-only night mode). Clicking a reading, or the arrow
 * keys when the chart has focus, selects it; `onSelect` gets its index.
 */
import { DateTime } from "luxon";
import { useMemo, type KeyboardEvent } from "react";
import {
  Area,
  CartesianGrid,
  ComposedChart,
  Legend,
  ReferenceDot,
  ReferenceLine,
  ResponsiveContainer,
  Scatter,
  Tooltip,
  XAxis,
  YAxis,
} from "recharts";
import { useThemeTokens, type ThemeTokens } from "@/components/map/use-theme-tokens";
import type { FlagName } from "@/lib/flags";

export type CurveReading = {
  takenAt: string;
  mag: number;
  sunAltDeg: number;
  moonAltDeg: number;
  moonFraction: number;
  flags: FlagName[];
};

export type ReadingCategory = "counted" | "sun" | "moonlit" | "cloud-suspect" | "out-of-range";

/** The outcome a reading is drawn as: the first that applies, in this order. */
export function readingCategory(flags: readonly FlagName[]): ReadingCategory {
  if (flags.includes("out-of-range")) return "out-of-range";
  if (flags.includes("daylight") || flags.includes("twilight")) return "sun";
  if (flags.includes("moonlit")) return "moonlit";
  if (flags.includes("cloud-suspect")) return "cloud-suspect";
  return "counted";
}

export const CATEGORY_STYLE: Record<ReadingCategory, { label: string; shape: "circle" | "triangle" | "diamond" | "square" | "cross"; token: string; glyph: string }> = {
  counted: { label: "Counted", shape: "circle", token: "ok", glyph: "●" },
  sun: { label: "Daylight or twilight", shape: "triangle", token: "warn", glyph: "▲" },
  moonlit: { label: "Moonlit", shape: "diamond", token: "accent", glyph: "◆" },
  "cloud-suspect": { label: "Cloud suspected", shape: "square", token: "muted", glyph: "■" },
  "out-of-range": { label: "Out of range", shape: "cross", token: "danger", glyph: "✚" },
};

const CATEGORIES = Object.keys(CATEGORY_STYLE) as ReadingCategory[];

export type NightCurveProps = {
  readings: CurveReading[];
  timeZone: string;
  selected: number | null;
  onSelect: (index: number) => void;
  sunMaxAltDeg: number;
};

type Point = { x: number; mag: number; i: number };

export function NightCurve({ readings, timeZone, selected, onSelect, sunMaxAltDeg }: NightCurveProps) {
  const t = useThemeTokens();
  const { series, alt, ticks, magDomain } = useMemo(() => {
    const series = Object.fromEntries(CATEGORIES.map((c) => [c, [] as Point[]])) as Record<ReadingCategory, Point[]>;
    const alt = readings.map((r) => ({ x: Date.parse(r.takenAt), sun: r.sunAltDeg, moon: r.moonAltDeg }));
    readings.forEach((r, i) => series[readingCategory(r.flags)].push({ x: Date.parse(r.takenAt), mag: r.mag, i }));
    const xs = alt.map((a) => a.x);
    const lo = Math.min(...xs);
    const hi = Math.max(...xs);
    // Ticks on whole local hours, every two hours.
    const ticks: number[] = [];
    let h = DateTime.fromMillis(lo, { zone: timeZone }).startOf("hour").plus({ hours: 1 });
    while (h.toMillis() <= hi) {
      if (h.hour % 2 === 0) ticks.push(h.toMillis());
      h = h.plus({ hours: 1 });
    }
    const mags = readings.map((r) => r.mag);
    const magDomain: [number, number] = [Math.floor(Math.min(...mags) * 2) / 2, Math.ceil(Math.max(...mags) * 2) / 2];
    return { series, alt, ticks, magDomain };
  }, [readings, timeZone]);

  if (!t) return <p className="flex h-80 items-center justify-center text-muted" aria-busy="true">Drawing the night…</p>;

  const local = (ms: number) => DateTime.fromMillis(ms, { zone: timeZone }).toFormat("HH:mm");
  const sel = selected !== null ? readings[selected] : undefined;

  function onKeyDown(e: KeyboardEvent<HTMLDivElement>) {
    const last = readings.length - 1;
    const cur = selected ?? -1;
    const step = e.shiftKey ? 10 : 1;
    let next: number | null = null;
    if (e.key === "ArrowRight") next = Math.min(last, cur + step);
    else if (e.key === "ArrowLeft") next = Math.max(0, cur < 0 ? 0 : cur - step);
    else if (e.key === "Home") next = 0;
    else if (e.key === "End") next = last;
    if (next !== null) {
      e.preventDefault();
      onSelect(next);
    }
  }

  return (
    <div
      className="h-80 w-full rounded-lg focus-visible:outline-2 sm:h-96"
      tabIndex={0}
      role="group"
      aria-label={`Night curve, ${readings.length} readings. Use the left and right arrow keys to step through the readings (Shift for ten at a time, Home and End for the first and last); the explanation appears below the chart.`}
      onKeyDown={onKeyDown}
      data-testid="night-curve"
    >
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={alt} margin={{ top: 8, right: 8, bottom: 8, left: 0 }}>
          <CartesianGrid stroke={t.color.line} strokeDasharray="3 3" />
          <XAxis
            dataKey="x"
            type="number"
            scale="time"
            domain={["dataMin", "dataMax"]}
            ticks={ticks}
            tickFormatter={local}
            stroke={t.color.muted}
            tick={{ fill: t.color.muted, fontSize: 12 }}
            allowDuplicatedCategory={false}
          />
          <YAxis
            yAxisId="mag"
            domain={magDomain}
            tickFormatter={(v: number) => v.toFixed(1)}
            width={52}
            stroke={t.color.muted}
            tick={{ fill: t.color.muted, fontSize: 12 }}
            label={{ value: "mag/arcsec² (darker ↑)", angle: -90, position: "insideLeft", fill: t.color.muted, fontSize: 12, dy: 60 }}
          />
          <YAxis
            yAxisId="alt"
            orientation="right"
            domain={[-90, 90]}
            ticks={[-90, -45, -18, 0, 45, 90]}
            tickFormatter={(v: number) => `${v}°`}
            width={44}
            stroke={t.color.muted}
            tick={{ fill: t.color.muted, fontSize: 11 }}
          />
          <Area yAxisId="alt" dataKey="sun" name="Sun altitude" type="monotone" stroke={t.color.warn} fill={t.rgba("warn", 0.12)} baseValue={-90} strokeWidth={1} dot={false} activeDot={false} isAnimationActive={false} />
          <Area yAxisId="alt" dataKey="moon" name="Moon altitude" type="monotone" stroke={t.color.accent} strokeDasharray="4 3" fill={t.rgba("accent", 0.1)} baseValue={-90} strokeWidth={1} dot={false} activeDot={false} isAnimationActive={false} />
          <ReferenceLine yAxisId="alt" y={0} stroke={t.color.muted} strokeDasharray="2 4" />
          <ReferenceLine yAxisId="alt" y={sunMaxAltDeg} stroke={t.color.warn} strokeDasharray="2 4" label={{ value: `Sun ${sunMaxAltDeg}°`, fill: t.color.warn, fontSize: 11, position: "insideBottomRight" }} />
          {CATEGORIES.map((c) =>
            series[c].length > 0 ? (
              <Scatter
                key={c}
                yAxisId="mag"
                data={series[c]}
                dataKey="mag"
                name={`${CATEGORY_STYLE[c].label} (${series[c].length})`}
                shape={CATEGORY_STYLE[c].shape}
                fill={t.color[CATEGORY_STYLE[c].token]}
                isAnimationActive={false}
                cursor="pointer"
                onClick={(p) => {
                  const i = (p as { payload?: Point }).payload?.i;
                  if (typeof i === "number") onSelect(i);
                }}
                data-category={c}
              />
            ) : null,
          )}
          {sel ? (
            <ReferenceDot yAxisId="mag" x={Date.parse(sel.takenAt)} y={sel.mag} r={9} fill="none" stroke={t.color.fg} strokeWidth={2} ifOverflow="extendDomain" />
          ) : null}
          <Tooltip content={<CurveTooltip t={t} readings={readings} local={local} />} cursor={{ stroke: t.color.line }} />
          <Legend wrapperStyle={{ color: t.color.fg, fontSize: 12 }} />
        </ComposedChart>
      </ResponsiveContainer>
    </div>
  );
}

function CurveTooltip({ t, readings, local, active, payload }: { t: ThemeTokens; readings: CurveReading[]; local: (ms: number) => string; active?: boolean; payload?: ReadonlyArray<{ payload?: Point & { sun?: number } }> }) {
  if (!active || !payload?.length) return null;
  const p = payload.find((x) => typeof x.payload?.i === "number")?.payload;
  if (!p) return null;
  const r = readings[p.i]!;
  const cat = CATEGORY_STYLE[readingCategory(r.flags)];
  return (
    <div style={{ background: t.color.surface, border: `1px solid ${t.color.line}`, color: t.color.fg }} className="rounded px-2 py-1 text-xs">
      <p>
        {local(p.x)} · {r.mag.toFixed(2)} mag/arcsec²
      </p>
      <p>
        {cat.glyph} {cat.label} — click for why
      </p>
    </div>
  );
}
