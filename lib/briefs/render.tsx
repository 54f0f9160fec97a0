/**
 * The hearing brief as a PDF (@react-pdf/renderer, server side, in the worker). Everything printed
 * comes from BriefData (lib/briefs/data.ts); this module only lays it out. Charts and the location
 * figure are vector graphics (react-pdf Svg primitives). Fonts: the app's own Atkinson Hyperlegible
 * (WOFF files of the @fontsource package the app ships), no network. Print colours are fixed greys
 * and one blue: a PDF has no night mode, so the screen's design tokens do not apply here.
 * The fonts have no ≈ ≥ ≤ Δ → glyphs: the text avoids them.
 */
import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { Circle, Document, Font, G, Line, Page, Path, Polyline, Rect, renderToBuffer, StyleSheet, Svg, Text, View } from "@react-pdf/renderer";
import type { ReactNode } from "react";
import type { Position } from "geojson";
import { haversineKm, GLOW_ESTIMATE_CAUTION } from "@/lib/glow";
import { dayNumber, YEAR_DAYS } from "@/lib/trends/site-trend";
import type { BriefData, SiteBrief } from "./data";

// The woff2 copies in public/fonts embed with empty glyphs (fontkit's woff2 subsetting), so the
// WOFF 1 files of the same @fontsource packages are used.
const fontPath = (pkg: string, f: string) => fileURLToPath(new URL(`../../node_modules/@fontsource/${pkg}/files/${f}`, import.meta.url));
let fontsReady: { body: string; mono: string } | null = null;
function fonts() {
  if (fontsReady) return fontsReady;
  const files = {
    r: fontPath("atkinson-hyperlegible", "atkinson-hyperlegible-latin-400-normal.woff"),
    b: fontPath("atkinson-hyperlegible", "atkinson-hyperlegible-latin-700-normal.woff"),
  };
  if (process.env.BRIEF_FONT !== "builtin" && Object.values(files).every((f) => existsSync(f))) {
    Font.register({ family: "Atkinson", fonts: [{ src: files.r }, { src: files.b, fontWeight: 700 }] });
    Font.registerHyphenationCallback((w) => [w]);
    // IBM Plex Mono's WOFF fails in fontkit on the space glyph; the verification code (A–Z, 2–7) is
    // set in the built-in Courier instead.
    fontsReady = { body: "Atkinson", mono: "Courier" };
  } else {
    // Built into PDF readers; no download. Lacks the true minus sign, so numbers still read right with "-".
    fontsReady = { body: "Helvetica", mono: "Courier" };
  }
  return fontsReady;
}

// Print palette (see the module comment).
const INK = "#1a1a1a";
const GREY = "#5c5c5c";
const RULE = "#c8c8c8";
const LIGHT = "#eeeeee";
const BLUE = "#1f4e8c";
const YEAR_SHADES = ["#9a9a9a", "#5c8fcf", "#1f4e8c", "#0b2447", "#000000"];

const MINUS = "\u2212";
/** The embedded font has no ∝ ≈ ≥ ≤ glyphs: spell them out. */
const pdfSafe = (t: string) => t.replace(/\s*∝\s*/g, " proportional to ").replace(/≈/g, "about ").replace(/≥/g, ">=").replace(/≤/g, "<=");
export const signed = (v: number, d: number) => (v < 0 && Number(Math.abs(v).toFixed(d)) !== 0 ? `${MINUS}${Math.abs(v).toFixed(d)}` : `${v > 0 ? "+" : ""}${v.toFixed(d)}`);
export const fixed = (v: number, d: number) => (v < 0 && Number(Math.abs(v).toFixed(d)) !== 0 ? `${MINUS}${Math.abs(v).toFixed(d)}` : Math.abs(v).toFixed(d));
const pEq = (p: number) => (p < 0.001 ? "< 0.001" : `= ${p.toFixed(3)}`);
const MONTHS = ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"];

/** "2026-12-01 23:40 UTC" and the same instant in a zone. */
export function timeIn(iso: string, zone: string): string {
  const d = new Date(iso);
  const parts = new Intl.DateTimeFormat("en-GB", { timeZone: zone, year: "numeric", month: "2-digit", day: "2-digit", hour: "2-digit", minute: "2-digit", hour12: false, timeZoneName: "short" }).formatToParts(d);
  const g = (t: string) => parts.find((p) => p.type === t)?.value ?? "";
  return `${g("year")}-${g("month")}-${g("day")} ${g("hour")}:${g("minute")} ${zone === "UTC" ? "UTC" : `${g("timeZoneName")} (${zone})`}`;
}

function makeStyles(f: { body: string; mono: string }) {
  return StyleSheet.create({
    page: { fontFamily: f.body, fontSize: 10, color: INK, paddingTop: 48, paddingBottom: 60, paddingHorizontal: 48 },
    h1: { fontSize: 24, fontWeight: 700, marginBottom: 6, lineHeight: 1.2 },
    h2: { fontSize: 15, fontWeight: 700, marginTop: 14, marginBottom: 6, color: BLUE },
    h3: { fontSize: 11.5, fontWeight: 700, marginTop: 8, marginBottom: 3 },
    p: { marginBottom: 5 },
    small: { fontSize: 8.5, color: GREY },
    mono: { fontFamily: f.mono },
    big: { fontSize: 26, fontWeight: 700 },
    box: { borderWidth: 1, borderColor: RULE, borderRadius: 4, padding: 8, marginBottom: 8 },
    caution: { borderWidth: 1.5, borderColor: INK, borderRadius: 4, padding: 8, marginVertical: 6, backgroundColor: LIGHT },
    row: { flexDirection: "row", borderBottomWidth: 0.5, borderBottomColor: RULE, paddingVertical: 2.5 },
    headRow: { flexDirection: "row", borderBottomWidth: 1, borderBottomColor: INK, paddingVertical: 2.5, fontWeight: 700 },
    footer: { position: "absolute", bottom: 24, left: 48, right: 48, flexDirection: "row", justifyContent: "space-between", fontSize: 8, color: GREY, borderTopWidth: 0.5, borderTopColor: RULE, paddingTop: 4 },
  });
}
type Styles = ReturnType<typeof makeStyles>;

function Table({ s, cols, rows }: { s: Styles; cols: { label: string; w: number; align?: "right" }[]; rows: ReactNode[][] }) {
  return (
    <View style={{ marginBottom: 6 }}>
      <View style={s.headRow} wrap={false}>
        {cols.map((c, i) => (
          <Text key={i} style={{ width: `${c.w}%`, textAlign: c.align ?? "left", paddingRight: 4 }}>
            {c.label}
          </Text>
        ))}
      </View>
      {rows.map((r, j) => (
        <View key={j} style={s.row} wrap={false}>
          {r.map((cell, i) => (
            <Text key={i} style={{ width: `${cols[i]!.w}%`, textAlign: cols[i]!.align ?? "left", paddingRight: 4 }}>
              {cell}
            </Text>
          ))}
        </View>
      ))}
    </View>
  );
}

// ---------------------------------------------------------------------------------------------
// Figures
// ---------------------------------------------------------------------------------------------

function rings(b: SiteBrief["site"]["boundary"]): Position[][] {
  return b.type === "Polygon" ? [b.coordinates[0]!] : b.coordinates.map((p) => p[0]!);
}

/** Boundary polygon and station dots, equirectangular at the site's latitude, with a scale bar. */
function LocationFigure({ site, s }: { site: SiteBrief; s: Styles }) {
  const W = 499;
  const H = 200;
  const pad = 18;
  const pts: Position[] = [...rings(site.site.boundary).flat(), ...site.stations.map((st) => [st.lon, st.lat])];
  const lons = pts.map((p) => p[0]!);
  const lats = pts.map((p) => p[1]!);
  const [w, e, so, n] = [Math.min(...lons), Math.max(...lons), Math.min(...lats), Math.max(...lats)];
  const midLat = (so + n) / 2;
  const kx = Math.cos((midLat * Math.PI) / 180);
  const spanX = Math.max((e - w) * kx, 1e-6);
  const spanY = Math.max(n - so, 1e-6);
  const scale = Math.min((W - 2 * pad) / spanX, (H - 2 * pad - 20) / spanY);
  const x = (lon: number) => pad + ((lon - w) * kx) * scale + (W - 2 * pad - spanX * scale) / 2;
  const y = (lat: number) => pad + (n - lat) * scale;
  // Scale bar: a round number of km close to a quarter of the width.
  const kmPerPt = haversineKm({ lat: midLat, lon: w }, { lat: midLat, lon: e }) / (spanX * scale);
  const target = (W / 4) * kmPerPt;
  const barKm = [0.5, 1, 2, 5, 10, 20, 50, 100].reduce((best, v) => (Math.abs(v - target) < Math.abs(best - target) ? v : best), 1);
  const barPt = barKm / kmPerPt;
  return (
    <View wrap={false}>
      <Svg width={W} height={H} style={{ borderWidth: 0.5, borderColor: RULE }}>
        {rings(site.site.boundary).map((r, i) => (
          <Path key={i} d={r.map((p, j) => `${j ? "L" : "M"}${x(p[0]!).toFixed(1)},${y(p[1]!).toFixed(1)}`).join(" ") + " Z"} fill="#dfe7f2" stroke={BLUE} strokeWidth={1.2} />
        ))}
        {site.stations.map((st) => (
          <G key={st.slug}>
            <Circle cx={x(st.lon)} cy={y(st.lat)} r={4} fill={st.countsTowardSite ? INK : "#ffffff"} stroke={INK} strokeWidth={1} />
            <Text x={x(st.lon) + 6} y={y(st.lat) + 3} style={{ fontSize: 7 }}>
              {st.name}
            </Text>
          </G>
        ))}
        <Line x1={pad} y1={H - 12} x2={pad + barPt} y2={H - 12} stroke={INK} strokeWidth={2} />
        <Text x={pad + barPt + 5} y={H - 9} style={{ fontSize: 7 }}>
          {`${barKm} km`}
        </Text>
        <Text x={W - 60} y={14} style={{ fontSize: 7 }}>
          North up
        </Text>
      </Svg>
      <Text style={s.small}>
        Site boundary (blue outline) and stations (filled: approved, counted; open: not counted). Equirectangular projection at {fixed(midLat, 2)}°; the bar is {barKm} km.
        {site.stations[0]?.positionRounded ? " Station positions are rounded to about 1 km, as the site asks for its public side." : ""}
      </Text>
    </View>
  );
}

type Axis = { min: number; max: number };
function magAxis(values: number[], extra: number[] = []): Axis {
  const all = [...values, ...extra];
  let min = Math.min(...all);
  let max = Math.max(...all);
  if (max - min < 0.2) {
    const mid = (max + min) / 2;
    min = mid - 0.1;
    max = mid + 0.1;
  }
  const padMag = (max - min) * 0.08;
  return { min: Math.floor((min - padMag) * 20) / 20, max: Math.ceil((max + padMag) * 20) / 20 };
}
function ticks(a: Axis, count = 5): number[] {
  const step = [0.05, 0.1, 0.2, 0.25, 0.5, 1, 2].find((s) => (a.max - a.min) / s <= count) ?? 5;
  const out: number[] = [];
  for (let v = Math.ceil(a.min / step) * step; v <= a.max + 1e-9; v += step) out.push(Math.round(v * 100) / 100);
  return out;
}

/** Nightly site values as dots, with the Theil–Sen trend line and the site's target. */
function NightsChart({ site, s, from, to }: { site: SiteBrief; s: Styles; from: string; to: string }) {
  const W = 499;
  const H = 210;
  const L = 40;
  const R = 10;
  const T = 10;
  const B = 26;
  const d0 = dayNumber(from);
  const d1 = Math.max(dayNumber(to), d0 + 1);
  const axis = magAxis(site.nights.map((n) => n.mag), [site.site.targetMag]);
  const x = (night: string) => L + ((dayNumber(night) - d0) / (d1 - d0)) * (W - L - R);
  const y = (mag: number) => T + ((axis.max - mag) / (axis.max - axis.min)) * (H - T - B);
  const t = site.trend;
  const monthStarts: string[] = [];
  for (let m = new Date(`${from.slice(0, 7)}-01T00:00:00Z`); m.toISOString().slice(0, 10) <= to; m.setUTCMonth(m.getUTCMonth() + 1)) {
    const iso = m.toISOString().slice(0, 10);
    if (iso >= from) monthStarts.push(iso);
  }
  const labelEvery = Math.max(1, Math.ceil(monthStarts.length / 12));
  return (
    <View wrap={false}>
      <Svg width={W} height={H}>
        <Rect x={L} y={T} width={W - L - R} height={H - T - B} stroke={RULE} strokeWidth={0.5} fill="#ffffff" />
        {ticks(axis).map((v) => (
          <G key={v}>
            <Line x1={L} x2={W - R} y1={y(v)} y2={y(v)} stroke={LIGHT} strokeWidth={0.5} />
            <Text x={4} y={y(v) + 2.5} style={{ fontSize: 7 }}>
              {v.toFixed(2)}
            </Text>
          </G>
        ))}
        {monthStarts.map((m, i) =>
          i % labelEvery === 0 && x(m) < W - R - 30 ? (
            <Text key={m} x={x(m)} y={H - 12} style={{ fontSize: 7 }}>
              {`${MONTHS[Number(m.slice(5, 7)) - 1]} ${m.slice(2, 4)}`}
            </Text>
          ) : null,
        )}
        <Line x1={L} x2={W - R} y1={y(site.site.targetMag)} y2={y(site.site.targetMag)} stroke={GREY} strokeWidth={0.8} strokeDasharray="4,3" />
        {site.nights.map((n) => (
          <Circle key={n.night} cx={x(n.night)} cy={y(n.mag)} r={1.4} fill={INK} />
        ))}
        {t.status === "ok" ? (
          <Line
            x1={x(t.firstNight)}
            y1={y(t.interceptMag + (t.slopeMagPerYear * dayNumber(t.firstNight)) / YEAR_DAYS)}
            x2={x(t.lastNight)}
            y2={y(t.interceptMag + (t.slopeMagPerYear * dayNumber(t.lastNight)) / YEAR_DAYS)}
            stroke={BLUE}
            strokeWidth={1.8}
          />
        ) : null}
      </Svg>
      <Text style={s.small}>
        Nightly site values, mag/arcsec² (up = darker). Dots: one per night ({site.nights.length} nights). {t.status === "ok" ? "Blue line: Theil–Sen trend. " : ""}Dashed line: the site&apos;s target, {site.site.targetMag.toFixed(2)}.
      </Text>
    </View>
  );
}

/** The same months across years: one line per year of monthly medians. */
function SeasonalChart({ site, s }: { site: SiteBrief; s: Styles }) {
  const W = 499;
  const H = 190;
  const L = 40;
  const R = 80;
  const T = 10;
  const B = 22;
  const years = [...new Set(site.seasonal.map((m) => m.year))].sort();
  if (site.seasonal.length === 0) return <Text style={s.p}>No nights yet for a seasonal comparison.</Text>;
  const axis = magAxis(site.seasonal.map((m) => m.medianMag));
  const x = (month: number) => L + ((month - 0.5) / 12) * (W - L - R);
  const y = (mag: number) => T + ((axis.max - mag) / (axis.max - axis.min)) * (H - T - B);
  return (
    <View wrap={false}>
      <Svg width={W} height={H}>
        <Rect x={L} y={T} width={W - L - R} height={H - T - B} stroke={RULE} strokeWidth={0.5} fill="#ffffff" />
        {ticks(axis).map((v) => (
          <G key={v}>
            <Line x1={L} x2={W - R} y1={y(v)} y2={y(v)} stroke={LIGHT} strokeWidth={0.5} />
            <Text x={4} y={y(v) + 2.5} style={{ fontSize: 7 }}>
              {v.toFixed(2)}
            </Text>
          </G>
        ))}
        {MONTHS.map((m, i) => (
          <Text key={m} x={x(i + 1) - 7} y={H - 8} style={{ fontSize: 7 }}>
            {m}
          </Text>
        ))}
        {years.map((yr, i) => {
          const colour = YEAR_SHADES[(YEAR_SHADES.length - years.length + i + YEAR_SHADES.length) % YEAR_SHADES.length]!;
          const pts = site.seasonal.filter((m) => m.year === yr).sort((a, b) => a.month - b.month);
          return (
            <G key={yr}>
              {pts.length > 1 ? <Polyline points={pts.map((p) => `${x(p.month).toFixed(1)},${y(p.medianMag).toFixed(1)}`).join(" ")} stroke={colour} strokeWidth={1.4} fill="none" strokeDasharray={i % 2 ? "3,2" : undefined} /> : null}
              {pts.map((p) => (
                <Circle key={p.month} cx={x(p.month)} cy={y(p.medianMag)} r={2.2} fill={colour} />
              ))}
              <Line x1={W - R + 10} x2={W - R + 28} y1={T + 8 + i * 14} y2={T + 8 + i * 14} stroke={colour} strokeWidth={1.6} strokeDasharray={i % 2 ? "3,2" : undefined} />
              <Text x={W - R + 32} y={T + 11 + i * 14} style={{ fontSize: 7.5 }}>
                {String(yr)}
              </Text>
            </G>
          );
        })}
      </Svg>
      <Text style={s.small}>Median of the nightly site values in each calendar month, one line per year, up to the end of the period (up = darker).</Text>
    </View>
  );
}

// ---------------------------------------------------------------------------------------------
// Sections
// ---------------------------------------------------------------------------------------------

function SiteSection({ site, data, s, first }: { site: SiteBrief; data: BriefData; s: Styles; first: boolean }) {
  const h = site.headline;
  const t = site.trend;
  const b = site.baseline;
  const th = site.site.thresholds;
  const tot = site.screening.totals;
  return (
    <>
      <Text style={s.h2} break={!first}>
        {site.site.name}: the record for {data.period.from} to {data.period.to}
      </Text>
      {site.site.description ? <Text style={s.p}>{pdfSafe(site.site.description)}</Text> : null}
      <Text style={s.p}>
        Time zone {site.site.timeZone}; target darkness {site.site.targetMag.toFixed(2)} mag/arcsec²{site.site.lightingZone ? `; lighting zone ${site.site.lightingZone} (CIE 150:2017)` : ""}.{" "}
        {site.stations.filter((x) => x.countsTowardSite).length} approved station(s) count toward the site.
      </Text>
      <Text style={s.h3}>Location</Text>
      <LocationFigure site={site} s={s} />

      <Text style={s.h3}>Headline</Text>
      {h ? (
        <View style={s.box} wrap={false}>
          <Text>Median zenith sky brightness over the period</Text>
          <Text style={s.big}>{fixed(h.period.medianMag, 2)} mag/arcsec²</Text>
          <Text style={s.p}>
            From {h.period.nights} nights with a site value ({h.period.firstNight} to {h.period.lastNight}). Spread (interquartile range){" "}
            {fixed(h.period.iqrMag, 2)} mag ({fixed(h.period.q1Mag, 2)} to {fixed(h.period.q3Mag, 2)}).
            {h.period.ci
              ? ` 95 % confidence interval for the median: ${fixed(h.period.ci.lower, 2)} to ${fixed(h.period.ci.upper, 2)} (distribution-free, from order statistics; coverage ${(h.period.ci.coverage * 100).toFixed(1)} %).`
              : " Too few nights for a confidence interval of the median."}
          </Text>
          <Text style={s.p}>
            {h.meetsTarget ? "Meets" : "Below"} the site&apos;s target of {site.site.targetMag.toFixed(2)} mag/arcsec²
            {h.meetsTarget ? "" : ` by ${fixed(site.site.targetMag - h.period.medianMag, 2)} mag`}.
          </Text>
          <Text style={s.p}>
            Last 30 nights of the period (the site page&apos;s &quot;darkness now&quot;): {fixed(h.endOfPeriod.medianMag, 2)} mag/arcsec², {h.endOfPeriod.firstNight} to {h.endOfPeriod.lastNight}, IQR{" "}
            {fixed(h.endOfPeriod.iqrMag, 2)} mag.
          </Text>
          <Text style={s.h3}>In plain terms (period median)</Text>
          <Table
            s={s}
            cols={[{ label: "Measure", w: 70 }, { label: "Value", w: 30, align: "right" }]}
            rows={[
              ["Brightness compared with a natural sky of " + site.site.naturalSkyMag.toFixed(1) + " mag/arcsec²", `× ${h.plain.ratioToNatural.toFixed(2)}`],
              ["Artificial light as % of the natural sky", `${h.plain.artificialPercent.toFixed(0)} %`],
              ["Sky luminance", `${h.plain.luminanceMcdM2.toFixed(3)} mcd/m²`],
              ["Faintest star visible to the naked eye (NELM)", `mag ${h.plain.nelm.toFixed(1)}`],
              ["Bortle class (approximate)", `about ${h.plain.bortleApprox.label}`],
            ]}
          />
        </View>
      ) : (
        <Text style={s.p}>No night in this period has a site value (no approved station had a usable night).</Text>
      )}

      <Text style={s.h3}>Trend</Text>
      {t.status === "ok" ? (
        <View wrap={false}>
          <Text style={s.p}>
            Theil–Sen slope {signed(t.slopeMagPerYear, 3)} mag/arcsec² per year (95 % interval {signed(t.lowerMagPerYear, 3)} to {signed(t.upperMagPerYear, 3)}), that is{" "}
            {Math.abs(t.brighteningPercentPerYear).toFixed(1)} % {t.brighteningPercentPerYear >= 0 ? "brighter" : "darker"} per year. Mann–Kendall S = {fixed(t.mannKendall.s, 0)}, Z = {fixed(t.mannKendall.z, 2)}, p{" "}
            {pEq(t.mannKendall.p)}: {t.significant ? `significant at the ${(t.alpha * 100).toFixed(0)} % level (${t.direction})` : `not significant at the ${(t.alpha * 100).toFixed(0)} % level`}.{" "}
            {t.seasonal ? `Seasonal Kendall (months as seasons): Z = ${fixed(t.seasonal.z, 2)}, p ${pEq(t.seasonal.p)}, seasonal slope ${signed(t.seasonal.slopeMagPerYear, 3)} mag/arcsec² per year.` : ""} {t.message}
          </Text>
          {dayNumber(t.lastNight) - dayNumber(t.firstNight) < 730 ? <Text style={s.small}>A trend over less than two years can reflect the seasons and the solar cycle as much as lighting; read it with the seasonal comparison.</Text> : null}
        </View>
      ) : (
        <Text style={s.p}>No trend is given: {t.message}</Text>
      )}
      <NightsChart site={site} s={s} from={data.period.from} to={data.period.to} />

      <Text style={s.h3}>Baseline: the same dates a year earlier</Text>
      {b.status === "ok" ? (
        <Text style={s.p}>
          Period median {fixed(b.periodMedianMag, 2)} ({b.periodNights} nights) against {fixed(b.medianMag, 2)} mag/arcsec² for {b.from} to {b.to} ({b.nights} nights): a difference of{" "}
          {signed(b.diffMag, 2)} mag, {Math.abs(b.brighterPercent).toFixed(1)} % {b.brighterPercent >= 0 ? "brighter" : "darker"} now. The windows may cover different months to different degrees.
        </Text>
      ) : (
        <Text style={s.p}>{b.message}</Text>
      )}
      <Text style={s.h3}>Seasonal comparison</Text>
      <SeasonalChart site={site} s={s} />

      <Text style={s.h3}>Screening</Text>
      <Text style={s.p}>
        Rules for this site: the Sun below {fixed(th.sunMaxAltDeg, 0)}° (geometric altitude), the Moon below {fixed(th.moonMaxAltDeg, 0)}°, and no cloud suspected (readings within a {th.cloudWindowMin}-minute window
        varying by more than {th.cloudSpreadMag.toFixed(2)} mag/arcsec²). Readings of the approved stations in the period&apos;s nights:
      </Text>
      <Table
        s={s}
        cols={[{ label: "Readings", w: 70 }, { label: "Count", w: 30, align: "right" }]}
        rows={[
          ["All readings", tot.readings.toLocaleString("en-US")],
          ["Usable (no flag)", tot.usable.toLocaleString("en-US")],
          ["Flag daylight (Sun above the horizon)", tot.daylight.toLocaleString("en-US")],
          ["Flag twilight (Sun above the site's limit)", tot.twilight.toLocaleString("en-US")],
          ["Flag moonlit (Moon above the site's limit)", tot.moonlit.toLocaleString("en-US")],
          ["Flag cloud-suspect", tot.cloudSuspect.toLocaleString("en-US")],
          ["Flag out-of-range", tot.outOfRange.toLocaleString("en-US")],
        ]}
      />
      <Text style={s.small}>
        A reading can carry more than one flag, so the flag counts can add up to more than the readings removed. Station-nights: {site.screening.stationNights}, of which{" "}
        {site.screening.usableStationNights} usable.
      </Text>

      <Text style={s.h3}>Calibration</Text>
      {site.calibrations.length ? (
        <Table
          s={s}
          cols={[{ label: "Station", w: 25 }, { label: "From", w: 17 }, { label: "Offset", w: 15, align: "right" }, { label: "In force in period", w: 18 }, { label: "Note", w: 25 }]}
          rows={site.calibrations.map((c) => [c.station, c.effectiveFrom, `${signed(c.offsetMag, 3)} mag`, c.inForce ? "yes" : "no", c.note])}
        />
      ) : (
        <Text style={s.p}>No calibration offsets are recorded for these stations; their raw values are used.</Text>
      )}
      <Text style={s.small}>Offsets are added to raw values when nights are summarised; the raw readings are never altered.</Text>

      <Text style={s.h3}>Provenance</Text>
      <Table
        s={s}
        cols={[{ label: "Station", w: 22 }, { label: "Position", w: 22 }, { label: "Status", w: 16 }, { label: "Readings by source", w: 24 }, { label: "Usable nights", w: 16, align: "right" }]}
        rows={site.stations.map((st) => {
          const p = site.provenance.stations.find((x) => x.slug === st.slug);
          return [
            `${st.name} (${st.slug})`,
            `${st.lat.toFixed(st.positionRounded ? 2 : 4)}, ${st.lon.toFixed(st.positionRounded ? 2 : 4)}`,
            `${st.status}, ${st.approval}`,
            p ? Object.entries(p.bySource).map(([k, v]) => `${k} ${v.toLocaleString("en-US")}`).join("; ") || "none" : "not counted",
            p ? `${p.usableNights} of ${p.nights}` : "-",
          ];
        })}
      />
      {site.provenance.uploads.length ? (
        <Table
          s={s}
          cols={[{ label: "Uploaded file", w: 28 }, { label: "Station", w: 17 }, { label: "SHA-256", w: 40 }, { label: "Accepted", w: 15, align: "right" }]}
          rows={site.provenance.uploads.map((u) => [u.filename, u.station, u.sha256, String(u.accepted)])}
        />
      ) : (
        <Text style={s.small}>No readings in this period came from uploaded files (sources: post = sent by the meter, upload = a logger file, survey = handheld, seed = demonstration data).</Text>
      )}
    </>
  );
}

function GlowSection({ data, s }: { data: BriefData; s: Styles }) {
  if (!data.glowEstimates.length) return null;
  return (
    <>
      <Text style={s.h2} break>
        Glow estimate (what-if): not a measurement
      </Text>
      <View style={s.caution}>
        <Text style={{ fontWeight: 700 }}>This section is a model estimate, not measured data.</Text>
        <Text>{pdfSafe(GLOW_ESTIMATE_CAUTION)}</Text>
      </View>
      {data.glowEstimates.map((g) => (
        <View key={g.id} style={{ marginBottom: 8 }}>
          <Text style={s.h3}>{g.name}</Text>
          <Text style={s.p}>
            Proposed development at {g.proposed.lat.toFixed(4)}, {g.proposed.lon.toFixed(4)}:{" "}
            {g.proposed.population !== undefined ? `${g.proposed.population.toLocaleString("en-US")} people` : `${(g.proposed.lumens ?? 0).toLocaleString("en-US")} lm installed (about ${((g.proposed.lumens ?? 0) / 1000).toLocaleString("en-US")} people at an assumed 1,000 lm per person)`}
            . Saved {g.createdAt.slice(0, 10)}.
          </Text>
          <Table
            s={s}
            cols={[{ label: "Site", w: 24 }, { label: "Distance", w: 13, align: "right" }, { label: "Measured", w: 14, align: "right" }, { label: "Added glow", w: 16, align: "right" }, { label: "Brighter", w: 12, align: "right" }, { label: "Note", w: 21 }]}
            rows={g.results.map((r) => [
              r.siteName,
              `${r.distanceKm.toFixed(1)} km`,
              r.measuredMag === null ? "-" : fixed(r.measuredMag, 2),
              r.ok && r.deltaMag !== null ? `${signed(r.deltaMag, 3)} mag` : "-",
              r.ok && r.percentBrighter !== null ? `${r.percentBrighter.toFixed(1)} %` : "-",
              r.ok ? (r.withinValidity ? "within 10-50 km" : "OUTSIDE 10-50 km: less reliable") : pdfSafe(r.reason ?? "not available"),
            ])}
          />
          <Text style={s.small}>
            Existing sources used for scaling: {g.existingSources.map((x) => `${x.name} (${x.population.toLocaleString("en-US")} people${x.distanceKm !== undefined ? `, ${x.distanceKm} km from ${x.siteSlug}` : ""})`).join("; ") || "none"}.
          </Text>
        </View>
      ))}
    </>
  );
}

export function BriefDocument({ data }: { data: BriefData }) {
  const f = fonts();
  const s = makeStyles(f);
  const first = data.sites[0]!;
  const title = data.sites.map((x) => x.site.name).join(", ");
  const code = data.verification.code;
  return (
    <Document title={`Hearing brief: ${title}, ${data.period.from} to ${data.period.to}`} author="Nightmark" subject={`Verification code ${code}`} creator={`Nightmark ${data.softwareVersion}`} producer="Nightmark">
      <Page size="A4" style={s.page}>
        <Footer code={code} s={s} />
        <Text style={{ fontSize: 11, color: BLUE, fontWeight: 700, marginBottom: 30 }}>Nightmark · Hearing brief</Text>
        <Text style={s.h1}>{title}</Text>
        <Text style={{ fontSize: 14, marginBottom: 18 }}>
          Zenith night-sky brightness, {data.period.from} to {data.period.to}
        </Text>
        <View style={s.box}>
          <Text>Period (nights named by their evening date): {data.period.from} to {data.period.to}</Text>
          <Text>Generated: {timeIn(data.generatedAt, "UTC")}</Text>
          <Text>Generated, site time: {timeIn(data.generatedAt, first.site.timeZone)}</Text>
          <Text>Software: Nightmark {data.softwareVersion}</Text>
          <Text>
            Verification code: <Text style={{ ...s.mono, fontSize: 12 }}>{code}</Text>
          </Text>
          <Text style={s.small}>
            The code is the start of a SHA-256 fingerprint ({data.verification.sha256.slice(0, 16)}…) of the exact data behind this brief: sites, period, thresholds, the {data.verification.nightRows} per-station night
            summaries of {data.verification.stations} station(s), calibrations and software version. Enter it on the Nightmark verification page (/verify/{code}) to see which data it maps to.
          </Text>
        </View>
        <Text style={s.h3}>At a glance</Text>
        {data.sites.map((x) => (
          <Text key={x.site.slug} style={s.p}>
            {x.site.name}:{" "}
            {x.headline
              ? `median ${fixed(x.headline.period.medianMag, 2)} mag/arcsec² over ${x.headline.period.nights} nights (IQR ${fixed(x.headline.period.iqrMag, 2)} mag), ${x.headline.meetsTarget ? "meets" : "below"} the target of ${x.site.targetMag.toFixed(2)}. `
              : "no usable nights in the period. "}
            {x.trend.status === "ok"
              ? `Trend ${signed(x.trend.slopeMagPerYear, 3)} mag/arcsec² per year, ${x.trend.significant ? "significant" : "not significant"} (Mann–Kendall p ${x.trend.mannKendall.p < 0.001 ? "< 0.001" : `= ${x.trend.mannKendall.p.toFixed(3)}`}).`
              : "Not enough nights for a trend."}
          </Text>
        ))}
        <View style={s.caution}>
          <Text style={{ fontWeight: 700, marginBottom: 2 }}>Cautions</Text>
          {data.cautions.map((c, i) => (
            <Text key={i}>• {c}</Text>
          ))}
        </View>
        <Text style={s.small}>
          Units: sky brightness in mag/arcsec² (bigger = darker; 5 mag = ×100 in brightness); angles in degrees; times in UTC unless marked. The raw evidence (night summaries and readings as CSV, station and site
          positions as GeoJSON) is available from Nightmark for the same period.
        </Text>
      </Page>
      <Page size="A4" style={s.page}>
        <Footer code={code} s={s} />
        {data.sites.map((x, i) => (
          <SiteSection key={x.site.slug} site={x} data={data} s={s} first={i === 0} />
        ))}
        <GlowSection data={data} s={s} />
        <Text style={s.h2} break>
          Methods and sources
        </Text>
        {data.methods.map((m) => (
          <View key={m.topic} style={{ marginBottom: 6 }} wrap={false}>
            <Text style={s.h3}>{m.topic}</Text>
            <Text style={s.p}>{m.text}</Text>
            <Text style={s.small}>Source: {m.source}</Text>
          </View>
        ))}
        <Text style={s.h2}>Cautions</Text>
        <View style={s.caution} wrap={false}>
          {data.cautions.map((c, i) => (
            <Text key={i} style={{ marginBottom: 3 }}>
              {i + 1}. {c}
            </Text>
          ))}
        </View>
      </Page>
    </Document>
  );
}

function Footer({ code, s }: { code: string; s: Styles }) {
  return (
    <View style={s.footer} fixed>
      <Text>Nightmark hearing brief · verification code {code}</Text>
      <Text render={({ pageNumber, totalPages }) => `Page ${pageNumber} of ${totalPages}`} />
    </View>
  );
}

/** Renders the brief to PDF bytes. */
export async function renderBriefPdf(data: BriefData): Promise<Buffer> {
  return renderToBuffer(<BriefDocument data={data} />);
}
