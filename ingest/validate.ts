import { validateMag } from "./screening/screen";

/** Readings from further ahead than this are refused (a logger's clock may run a little fast). */
export const CLOCK_SKEW_MS = 5 * 60_000;
/** Nothing earlier is a plausible digital sky-meter reading (common practice: the meters date from the 2000s). */
export const EARLIEST_READING = new Date("2000-01-01T00:00:00Z");
/** Plausible range of a logger's temperature sensor, °C. */
export const TEMP_MIN_C = -90;
export const TEMP_MAX_C = 70;

/** ISO 8601 date-time with an explicit offset (Z or ±hh:mm). */
const ISO_WITH_OFFSET = /^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}(:\d{2}(\.\d{1,9})?)?(Z|[+-]\d{2}:?\d{2})$/i;

export type ValidReading = { index: number; takenAt: Date; mag: number; tempC: number | null };
export type Rejection = { index: number; reason: string };

export function parseTakenAt(value: unknown, now: number): Date | string {
  if (value === undefined || value === null || value === "") return "takenAt is missing";
  if (typeof value !== "string") return "takenAt must be an ISO 8601 string with an offset, e.g. 2026-11-30T23:15:00Z";
  if (!ISO_WITH_OFFSET.test(value.trim()))
    return `takenAt "${value.slice(0, 40)}" is not ISO 8601 with an offset (e.g. 2026-11-30T23:15:00Z or …+01:00)`;
  const d = new Date(value.trim().replace(" ", "T"));
  if (Number.isNaN(d.getTime())) return `takenAt "${value.slice(0, 40)}" is not a real date and time`;
  return checkTime(d, now);
}

export function checkTime(d: Date, now: number): Date | string {
  if (d.getTime() > now + CLOCK_SKEW_MS) return `takenAt ${d.toISOString()} is in the future (more than 5 minutes ahead of the server clock)`;
  if (d < EARLIEST_READING) return `takenAt ${d.toISOString()} is implausibly old (before 2000-01-01)`;
  return d;
}

export function checkTemp(value: unknown): number | null | string {
  if (value === undefined || value === null || value === "") return null;
  if (typeof value !== "number" || !Number.isFinite(value)) return "tempC must be a number (°C) when given";
  if (value < TEMP_MIN_C || value > TEMP_MAX_C) return `tempC ${value} is outside ${TEMP_MIN_C}…${TEMP_MAX_C} °C`;
  return value;
}

/** Validates one item of a batch; a string is the reason it was rejected. */
export function validateItem(item: unknown, index: number, now: number): ValidReading | Rejection {
  if (typeof item !== "object" || item === null || Array.isArray(item))
    return { index, reason: "each reading must be an object with takenAt and mag" };
  const o = item as Record<string, unknown>;
  const t = parseTakenAt(o.takenAt, now);
  if (typeof t === "string") return { index, reason: t };
  if (o.mag === undefined || o.mag === null || o.mag === "") return { index, reason: "mag is missing" };
  const magErr = validateMag(o.mag);
  if (magErr) return { index, reason: magErr };
  const temp = checkTemp(o.tempC);
  if (typeof temp === "string") return { index, reason: temp };
  return { index, takenAt: t, mag: o.mag as number, tempC: temp };
}

export function validateItems(items: readonly unknown[], now = Date.now()) {
  const valid: ValidReading[] = [];
  const rejected: Rejection[] = [];
  items.forEach((item, i) => {
    const r = validateItem(item, i, now);
    if ("reason" in r) rejected.push(r);
    else valid.push(r);
  });
  return { valid, rejected };
}
