/**
 * Night naming. A station's night runs from local noon to the next local noon in the station's IANA
 * time zone, and is named by its EVENING date: a reading at local 23:30 on 14 March and one at local
 * 04:10 on 15 March both belong to night "2025-03-14". Noon-to-noon keeps a whole dark period in one
 * night at every longitude, and local noon is never near a daylight-saving change, so a night is 24 h
 * long except across such a change (23 h or 25 h; the change happens inside the night).
 *
 * Precisely: the night of an instant is the local calendar date of the latest local noon at or before
 * it. That also covers days a zone skipped (Pacific/Apia skipped 30 December 2011 when it crossed the
 * date line: the night of 29 December ran until noon on the 31st) and noons that do not exist.
 */
import { DateTime } from "luxon";

const DATE_RE = /^(\d{4})-(\d{2})-(\d{2})$/;

function parseNight(night: string): { year: number; month: number; day: number } {
  const m = DATE_RE.exec(night);
  if (!m) throw new Error(`night must be YYYY-MM-DD, got ${JSON.stringify(night)}`);
  return { year: Number(m[1]), month: Number(m[2]), day: Number(m[3]) };
}

/** Calendar arithmetic on YYYY-MM-DD strings (no time zone involved). */
export function addDays(night: string, days: number): string {
  const { year, month, day } = parseNight(night);
  const d = new Date(Date.UTC(year, month - 1, day + days));
  return d.toISOString().slice(0, 10);
}

/** The local noon of a date in a zone as an instant, or null when that wall time does not exist. */
function localNoon(night: string, timeZone: string): number | null {
  const { year, month, day } = parseNight(night);
  const dt = DateTime.fromObject({ year, month, day, hour: 12 }, { zone: timeZone });
  if (!dt.isValid) throw new Error(`invalid time zone ${timeZone}`);
  // luxon moves a nonexistent wall time forward; such a noon does not exist.
  if (dt.year !== year || dt.month !== month || dt.day !== day || dt.hour !== 12 || dt.minute !== 0)
    return null;
  return dt.toMillis();
}

/** The night ("YYYY-MM-DD", its evening's local date) that an instant belongs to. */
export function nightOf(date: Date, timeZone: string): string {
  const ms = date.getTime();
  if (!Number.isFinite(ms)) throw new Error("invalid date");
  const local = DateTime.fromMillis(ms, { zone: timeZone });
  if (!local.isValid) throw new Error(`invalid time zone ${timeZone}`);
  let night = local.toISODate()!;
  if (local.hour < 12) night = addDays(night, -1);
  // Step back over a noon that does not exist or (after a skipped day) lies after the instant.
  for (let i = 0; i < 4; i++) {
    const noon = localNoon(night, timeZone);
    if (noon !== null && noon <= ms) return night;
    night = addDays(night, -1);
  }
  return night;
}

/** The instants a night runs between: [start, end), local noon of its date to the next local noon. */
export function nightBounds(night: string, timeZone: string): { start: Date; end: Date } {
  let start = localNoon(night, timeZone);
  if (start === null) {
    // A noon that does not exist: the night starts at the first instant after it (luxon's shift).
    const { year, month, day } = parseNight(night);
    start = DateTime.fromObject({ year, month, day, hour: 12 }, { zone: timeZone }).toMillis();
  }
  let next = addDays(night, 1);
  let end: number | null = null;
  for (let i = 0; i < 4 && end === null; i++) {
    end = localNoon(next, timeZone);
    if (end === null) next = addDays(next, 1);
  }
  return { start: new Date(start), end: new Date(end ?? start + 86_400_000) };
}

/**
 * A fast resolver for many readings of one station: remembers the current night's bounds, so only a
 * reading outside them costs a time-zone conversion. Same results as nightOf.
 */
export function nightResolver(timeZone: string): (date: Date) => string {
  let night = "";
  let startMs = Number.POSITIVE_INFINITY;
  let endMs = Number.NEGATIVE_INFINITY;
  return (date: Date) => {
    const ms = date.getTime();
    if (ms >= startMs && ms < endMs) return night;
    night = nightOf(date, timeZone);
    const b = nightBounds(night, timeZone);
    startMs = b.start.getTime();
    endMs = b.end.getTime();
    return night;
  };
}
