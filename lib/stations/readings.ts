/**
 * Reading a station's data: its night summaries and its readings (keyset-paged by taken_at).
 * Authorisation is lib/stations/access.ts (findStationForReader); these verbs take the station it found.
 *
 * Query parameters (parsed here with zod; a bad one answers 400 naming the parameter):
 * - nights: from, to = nights (YYYY-MM-DD, the evening's local date in the station's zone), inclusive.
 *   Defaults: to = last night, from = 364 nights before it. At most 3,660 nights per request.
 * - readings: from, to = a night (YYYY-MM-DD: from its local noon / to the next local noon, so the
 *   night is included) or an ISO 8601 date-time with an offset (from inclusive, to exclusive).
 *   Defaults: to = now; from = the start of last night (24 hours before `to` when only `to` is given). cursor = the `next` of the previous page;
 *   limit = 1…5,000 (default 1,000).
 */
import { and, asc, eq, gte, lte, sql } from "drizzle-orm";
import { z } from "zod";
import { nightSummaries } from "@/db/schema";
import type { Ctx } from "@/lib/auth/guard";
import { badRequest } from "@/lib/errors";
import { flagNames, isUsable } from "@/lib/flags";
import { addDays, nightBounds, nightOf } from "@/ingest/night";
import { stationThresholds, type StationViewer } from "./access";

const DATE_RE = /^\d{4}-\d{2}-\d{2}$/;
const DATE_TIME_RE = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,9})?)?(Z|[+-]\d{2}:?\d{2})$/i;
export const MAX_NIGHTS_PER_REQUEST = 3660;
export const MAX_READINGS_PER_PAGE = 5000;
export const DEFAULT_READINGS_PER_PAGE = 1000;

/** A real calendar date (rejects 2026-02-30). */
function isCalendarDate(v: string): boolean {
  if (!DATE_RE.test(v)) return false;
  const d = new Date(`${v}T00:00:00Z`);
  return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === v;
}

const blankToUndefined = (v: unknown) => (v === null || v === "" ? undefined : v);

const nightParam = z.preprocess(
  blankToUndefined,
  z.string().trim().refine(isCalendarDate, "must be a night as YYYY-MM-DD (e.g. 2026-01-10)").optional(),
);

export const stationNightsQuerySchema = z
  .object({ from: nightParam, to: nightParam })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { path: ["from"], message: "must be on or before `to`" });

const instantParam = z.preprocess(
  blankToUndefined,
  z
    .string()
    .trim()
    .refine(
      (v) => isCalendarDate(v) || (DATE_TIME_RE.test(v) && !Number.isNaN(Date.parse(v))),
      "must be a night (YYYY-MM-DD) or an ISO 8601 date-time with an offset (e.g. 2026-01-10T22:00:00Z)",
    )
    .optional(),
);

const CURSOR_RE = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{6}Z$/;

export const stationReadingsQuerySchema = z.object({
  from: instantParam,
  to: instantParam,
  cursor: z.preprocess(
    blankToUndefined,
    z
      .string()
      .refine((v) => CURSOR_RE.test(decodeCursor(v) ?? ""), "is not a cursor this API gave out (use the `next` value of the previous page)")
      .optional(),
  ),
  limit: z.preprocess(
    blankToUndefined,
    z.coerce
      .number({ message: "must be a whole number" })
      .int("must be a whole number")
      .min(1, "must be at least 1")
      .max(MAX_READINGS_PER_PAGE, `must be at most ${MAX_READINGS_PER_PAGE}`)
      .default(DEFAULT_READINGS_PER_PAGE),
  ),
});

export type StationNightsQuery = z.infer<typeof stationNightsQuerySchema>;
export type StationReadingsQuery = z.infer<typeof stationReadingsQuerySchema>;

/** Query parameters as an object for the schemas (absent → undefined). */
export function queryObject(url: string, names: string[]): Record<string, string | undefined> {
  const sp = new URL(url).searchParams;
  return Object.fromEntries(names.map((n) => [n, sp.get(n) ?? undefined]));
}

function encodeCursor(takenAtUs: string): string {
  return Buffer.from(takenAtUs, "utf8").toString("base64url");
}
function decodeCursor(cursor: string): string | null {
  try {
    return Buffer.from(cursor, "base64url").toString("utf8");
  } catch {
    return null;
  }
}

function stationHead(v: StationViewer) {
  const s = v.loaded.station;
  return { slug: s.slug, name: s.name, timeZone: s.timeZone };
}

/** The night a station's "last night" is today (its zone): the night before the current one. */
export function lastNightOf(timeZone: string, now = new Date()): string {
  return addDays(nightOf(now, timeZone), -1);
}

export type StationNight = {
  night: string;
  readings: number;
  usableReadings: number;
  medianMag: number | null;
  darkestSustainedMag: number | null;
  spreadMag: number | null;
  usableHours: number;
  calibrationOffsetMag: number;
  flagCounts: Record<string, number>;
  firstAt: string | null;
  lastAt: string | null;
  computedAt: string;
};

export async function listStationNights({ ctx, input }: { ctx: Ctx; input: { viewer: StationViewer; query: StationNightsQuery } }) {
  const st = input.viewer.loaded.station;
  const lastNight = lastNightOf(st.timeZone);
  // A `from` after last night with no `to` asks for nights that have not happened: an empty list.
  const to = input.query.to ?? (input.query.from && input.query.from > lastNight ? input.query.from : lastNight);
  const from = input.query.from ?? addDays(to, -364);
  const span = Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000) + 1;
  if (span > MAX_NIGHTS_PER_REQUEST)
    throw badRequest(`from: the range ${from} … ${to} is ${span} nights; ask for at most ${MAX_NIGHTS_PER_REQUEST} at a time.`, { path: "from" });
  const rows = await ctx.db
    .select()
    .from(nightSummaries)
    .where(and(eq(nightSummaries.stationId, st.id), gte(nightSummaries.night, from), lte(nightSummaries.night, to)))
    .orderBy(asc(nightSummaries.night));
  const nights: StationNight[] = rows.map((r) => ({
    night: r.night,
    readings: r.readings,
    usableReadings: r.usableReadings,
    medianMag: r.medianMag,
    darkestSustainedMag: r.darkestSustainedMag,
    spreadMag: r.spreadMag,
    usableHours: r.usableHours,
    calibrationOffsetMag: r.calibrationOffsetMag,
    flagCounts: r.flagCounts,
    firstAt: r.firstAt?.toISOString() ?? null,
    lastAt: r.lastAt?.toISOString() ?? null,
    computedAt: r.computedAt.toISOString(),
  }));
  return { station: stationHead(input.viewer), from, to, nights };
}

/** The CSV columns of the nights export, in order. */
export const NIGHTS_CSV_COLUMNS = [
  "night",
  "readings",
  "usable_readings",
  "median_mag",
  "darkest_sustained_mag",
  "spread_mag",
  "usable_hours",
  "calibration_offset_mag",
  "first_at",
  "last_at",
] as const;

/** RFC 4180 CSV (CRLF line ends, header row); empty cells for "no value". Numbers as JSON prints them. */
export function nightsToCsv(nights: StationNight[]): string {
  const cell = (v: string | number | null) => (v === null ? "" : String(v));
  const lines = [NIGHTS_CSV_COLUMNS.join(",")];
  for (const n of nights)
    lines.push(
      [n.night, n.readings, n.usableReadings, n.medianMag, n.darkestSustainedMag, n.spreadMag, n.usableHours, n.calibrationOffsetMag, n.firstAt, n.lastAt]
        .map(cell)
        .join(","),
    );
  return lines.join("\r\n") + "\r\n";
}

export type StationReading = {
  takenAt: string;
  mag: number;
  tempC: number | null;
  sunAltDeg: number;
  moonAltDeg: number;
  moonFraction: number;
  flags: string[];
  usable: boolean;
  source: string;
};

function resolveInstant(v: string, timeZone: string, end: boolean): Date {
  if (isCalendarDate(v)) {
    const b = nightBounds(v, timeZone);
    return end ? b.end : b.start;
  }
  return new Date(v);
}

export async function listStationReadings({ ctx, input }: { ctx: Ctx; input: { viewer: StationViewer; query: StationReadingsQuery } }) {
  const { loaded } = input.viewer;
  const st = loaded.station;
  const q = input.query;
  const to = q.to ? resolveInstant(q.to, st.timeZone, true) : new Date();
  const from = q.from
    ? resolveInstant(q.from, st.timeZone, false)
    : q.to
      ? new Date(to.getTime() - 86_400_000)
      : nightBounds(lastNightOf(st.timeZone), st.timeZone).start;
  if (from.getTime() >= to.getTime()) throw badRequest("from: must be before `to` (the range is empty).", { path: "from" });
  const after = q.cursor ? decodeCursor(q.cursor)! : null;
  const res = await ctx.db.execute<{
    t: string;
    mag: number;
    temp_c: number | null;
    sun_alt_deg: number;
    moon_alt_deg: number;
    moon_fraction: number;
    flags: number;
    source: string;
  }>(sql`
    SELECT to_char(taken_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"') AS t, mag, temp_c, sun_alt_deg, moon_alt_deg,
           moon_fraction, flags, source::text AS source
    FROM readings
    WHERE station_id = ${st.id}::uuid AND taken_at >= ${from.toISOString()}::timestamptz AND taken_at < ${to.toISOString()}::timestamptz
      ${after ? sql`AND taken_at > ${after}::timestamptz` : sql``}
    ORDER BY taken_at
    LIMIT ${q.limit + 1}`);
  const rows = res.rows;
  const more = rows.length > q.limit;
  const page = more ? rows.slice(0, q.limit) : rows;
  const readings: StationReading[] = page.map((r) => ({
    takenAt: new Date(r.t).toISOString(),
    mag: r.mag,
    tempC: r.temp_c,
    sunAltDeg: r.sun_alt_deg,
    moonAltDeg: r.moon_alt_deg,
    moonFraction: r.moon_fraction,
    flags: flagNames(r.flags),
    usable: isUsable(r.flags),
    source: r.source,
  }));
  return {
    station: { ...stationHead(input.viewer), thresholds: stationThresholds(loaded) },
    from: from.toISOString(),
    to: to.toISOString(),
    readings,
    next: more ? encodeCursor(page[page.length - 1]!.t) : null,
  };
}
