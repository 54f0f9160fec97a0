import { parse } from "csv-parse/sync";
import { badRequest, payloadTooLarge, unprocessable } from "@/lib/errors";

/** Most readings accepted in one request. */
export const MAX_BATCH = 10_000;
/** ~10,000 readings of about 80 bytes each, with room to spare. */
export const MAX_POST_BYTES = 2 * 1024 * 1024;

/** A JSON body `{"readings":[…]}` → its items (still unvalidated). */
export function itemsFromJson(text: string): unknown[] {
  let body: unknown;
  try {
    body = JSON.parse(text);
  } catch (err) {
    throw badRequest(`The body is not valid JSON: ${(err as Error).message}.`);
  }
  if (typeof body !== "object" || body === null || Array.isArray(body) || !("readings" in body))
    throw unprocessable('The body must be an object with a "readings" array: {"readings":[{"takenAt":"…","mag":21.4}]}.');
  const items = (body as { readings: unknown }).readings;
  if (!Array.isArray(items)) throw unprocessable('"readings" must be an array.');
  if (items.length === 0) throw unprocessable('"readings" is empty: send at least one reading.');
  if (items.length > MAX_BATCH) throw payloadTooLarge(`${items.length} readings in one request; at most ${MAX_BATCH} are accepted.`);
  return items;
}

/**
 * A CSV body with a header row `takenAt,mag,tempC` → items shaped like the JSON ones, so one
 * validator serves both. Item i is data row i (line i + 2 of the body).
 */
export function itemsFromCsv(text: string): unknown[] {
  let rows: string[][];
  try {
    rows = parse(text.replace(/^\uFEFF/, ""), { relax_column_count: true, skip_empty_lines: true, trim: true }) as string[][];
  } catch (err) {
    throw badRequest(`The CSV body could not be read: ${(err as Error).message}.`);
  }
  const header = rows[0];
  if (!header) throw unprocessable("The CSV body is empty: send a header row takenAt,mag,tempC and at least one row.");
  const cols = header.map((h) => h.trim());
  const ti = cols.indexOf("takenAt");
  const mi = cols.indexOf("mag");
  const ci = cols.indexOf("tempC");
  if (ti < 0 || mi < 0) throw unprocessable(`The CSV header must name the columns takenAt and mag (optional tempC); it has: ${cols.join(", ")}.`);
  const data = rows.slice(1);
  if (data.length === 0) throw unprocessable("The CSV body has a header but no readings.");
  if (data.length > MAX_BATCH) throw payloadTooLarge(`${data.length} readings in one request; at most ${MAX_BATCH} are accepted.`);
  const num = (s: string | undefined) => (s === undefined || s === "" ? undefined : Number(s));
  return data.map((r) => ({ takenAt: r[ti], mag: num(r[mi]), tempC: ci >= 0 ? num(r[ci]) : undefined }));
}
