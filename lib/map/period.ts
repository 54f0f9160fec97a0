/**
 * The map's and site pages' period filter. Values:
 * - `last30` (default): each station's (or site's) 30 most recent usable nights;
 * - `YYYY`: nights named in that calendar year;
 * - `YYYY-winter|spring|summer|autumn`: meteorological seasons of the northern hemisphere
 *   (Dec–Feb, Mar–May, Jun–Aug, Sep–Nov); winter YYYY runs from December YYYY to February YYYY+1.
 */
import { z } from "zod";

export const SEASONS = ["winter", "spring", "summer", "autumn"] as const;
export type Season = (typeof SEASONS)[number];

export type Period =
  | { kind: "last30"; label: string; from: null; to: null; lastN: 30 }
  | { kind: "year" | "season"; label: string; from: string; to: string; lastN: null };

const RE = /^(?:last30|(\d{4})(?:-(winter|spring|summer|autumn))?)$/;

export const periodSchema = z
  .string()
  .regex(RE, "period must be last30, a year (2025) or a season (2025-summer)")
  .default("last30");

function pad(n: number) {
  return String(n).padStart(2, "0");
}

function lastDay(year: number, month: number): string {
  const d = new Date(Date.UTC(year, month, 0));
  return `${year}-${pad(month)}-${pad(d.getUTCDate())}`;
}

export function parsePeriod(value: string | null | undefined): Period {
  const v = periodSchema.parse(value ?? undefined);
  if (v === "last30") return { kind: "last30", label: "Last 30 usable nights", from: null, to: null, lastN: 30 };
  const m = RE.exec(v)!;
  const year = Number(m[1]);
  const season = m[2] as Season | undefined;
  if (!season) return { kind: "year", label: String(year), from: `${year}-01-01`, to: `${year}-12-31`, lastN: null };
  const span: Record<Season, [number, number, number, number]> = {
    winter: [year, 12, year + 1, 2],
    spring: [year, 3, year, 5],
    summer: [year, 6, year, 8],
    autumn: [year, 9, year, 11],
  };
  const [y1, m1, y2, m2] = span[season];
  const label = season === "winter" ? `Winter ${year}–${String(year + 1).slice(2)}` : `${season[0]!.toUpperCase()}${season.slice(1)} ${year}`;
  return { kind: "season", label, from: `${y1}-${pad(m1)}-01`, to: lastDay(y2, m2), lastN: null };
}

/** Choices for a period select: the last 30 nights, then each year and its seasons, newest first. */
export function periodOptions(now = new Date(), years = 3): { value: string; label: string }[] {
  const out = [{ value: "last30", label: "Last 30 usable nights" }];
  const y0 = now.getUTCFullYear();
  for (let y = y0; y > y0 - years; y--) {
    out.push({ value: String(y), label: String(y) });
    for (const s of SEASONS) out.push({ value: `${y}-${s}`, label: parsePeriod(`${y}-${s}`).label });
  }
  return out;
}
