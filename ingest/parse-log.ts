/**
 * Reader for logger files: generic delimited text (comma, semicolon or tab), as a meter's logger or
 * a spreadsheet writes it. Pure (no Node or framework imports, only luxon), so the browser's preview
 * and the worker's import use the same code and agree on every line.
 *
 * The format accepted:
 * - optional UTF-8 byte-order mark; lines end in LF or CRLF;
 * - any number of `#` lines before the header row; those of the form `# key: value` are kept as the
 *   file's metadata, the rest are comments; `#` lines and empty lines further down are skipped;
 * - a header row naming the columns (when the first row already looks like data — a number or a
 *   date-time in any field — the columns are named "column 1", "column 2", … and that row is data);
 * - the delimiter is the one of `\t`, `;`, `,` found most often in the header row (ties: tab, then
 *   semicolon, then comma). With `;` a decimal comma ("21,43") is read as a decimal point;
 * - fields may be quoted with `"` (a `""` inside is one quote, delimiters inside are text). A quoted
 *   field must close on its own line: quoted line breaks are refused as a broken line, so one stray
 *   quote cannot swallow the rest of the file;
 * - a line longer than MAX_LINE_CHARS is refused (and skipped to its end) so memory stays bounded.
 *
 * Line numbers are what a text editor shows: the first line of the file is 1, and `#` lines, the
 * header row and empty lines all count.
 *
 * Times (the mapping's time column, read in the mapping's zone):
 * - ISO 8601 with an offset (`2025-03-09T08:59:00Z`, `…-07:00`, `… +0100`) or with a `UTC`/`GMT`
 *   suffix is that instant whatever the zone says;
 * - a local date-time without offset (`YYYY-MM-DD HH:MM[:SS[.fff]]`, `T` or space, `-` or `/`) is a
 *   wall-clock time in the chosen zone: "UTC", or an IANA zone resolved with luxon's zone data:
 *   - a time inside a spring-forward gap does not exist: rejected as "… does not exist in <zone> (DST change)";
 *   - a time inside a fall-back overlap happened twice: we take the EARLIER instant, i.e. the offset
 *     in force before the change (01:30 on 2024-11-03 in America/Denver is 01:30-06:00 = 07:30Z).
 *     A logger that writes local time usually writes its readings in order, and the first pass
 *     through the repeated hour comes first; the second pass then lands on the same instants and is
 *     reported as duplicates rather than silently shifted. Log in UTC to avoid the ambiguity.
 */
import { IANAZone } from "luxon";

export type Delimiter = "," | ";" | "\t";

/** What the volunteer confirms in the preview (stored as uploads.mapping). */
export type LogMapping = {
  delimiter: Delimiter;
  timeColumn: string;
  /** "UTC" or an IANA zone, for time values without an offset. */
  timeZone: string;
  magColumn: string;
  tempColumn?: string | null;
};

export type GuessedMapping = {
  timeColumn: string | null;
  timeZone: string;
  magColumn: string | null;
  tempColumn: string | null;
};

export type SampleRow = { line: number; values: string[]; reason?: string };

export type SniffResult = {
  delimiter: Delimiter;
  /** False when the first row already looked like data and the columns got generated names. */
  hasHeader: boolean;
  /** Line number of the header row, or of the first data row when there is no header. */
  headerLine: number;
  metadata: Record<string, string>;
  columns: string[];
  sampleRows: SampleRow[];
  guessedMapping: GuessedMapping;
};

export type LogRow = { line: number; values: string[] } | { line: number; reason: string };
export type LogReading = { line: number; takenAt: Date; mag: number; tempC: number | null } | { line: number; reason: string };

export type LogHeader = { delimiter: Delimiter; hasHeader: boolean; headerLine: number; columns: string[]; metadata: Record<string, string> };

/** A problem with the file as a whole (no header, unknown column), not with one line. */
export class LogFormatError extends Error {
  constructor(
    message: string,
    readonly line?: number,
  ) {
    super(message);
    this.name = "LogFormatError";
  }
}

export const MAX_LINE_CHARS = 65_536;
/** How much of a file the preview looks at. */
export const SNIFF_BYTES = 65_536;
export const SAMPLE_ROW_COUNT = 20;
const MAX_METADATA_ENTRIES = 200;
const DELIMITERS: Delimiter[] = ["\t", ";", ","];

export const delimiterName = (d: Delimiter) => (d === "\t" ? "tab" : d === ";" ? "semicolon" : "comma");

// ── lines ─────────────────────────────────────────────────────────────────────────────────────

type RawLine = { line: number; text: string } | { line: number; tooLong: true };

/**
 * Splits a byte (or text) stream into numbered lines, holding at most one line (capped) at a time.
 * The BOM is dropped; a trailing CR is cut from each line.
 */
export async function* readLines(source: AsyncIterable<Uint8Array | string>): AsyncGenerator<RawLine> {
  // TextDecoder drops a leading BOM by default (ignoreBOM: false) and keeps a split character whole.
  const decoder = new TextDecoder("utf-8");
  let buf = "";
  let line = 0;
  let skipping = false;
  let first = true;
  const take = function* (text: string, final: boolean): Generator<RawLine> {
    buf += text;
    if (first && buf.length > 0) {
      if (buf.charCodeAt(0) === 0xfeff) buf = buf.slice(1);
      first = false;
    }
    let start = 0;
    for (;;) {
      const nl = buf.indexOf("\n", start);
      if (nl < 0) break;
      line++;
      if (skipping) skipping = false;
      else {
        const end = nl > start && buf.charCodeAt(nl - 1) === 13 ? nl - 1 : nl;
        if (end - start > MAX_LINE_CHARS) yield { line, tooLong: true };
        else yield { line, text: buf.slice(start, end) };
      }
      start = nl + 1;
    }
    buf = start > 0 ? buf.slice(start) : buf;
    if (!skipping && buf.length > MAX_LINE_CHARS) {
      // Report the line now and drop what comes until its end, so a file without line breaks
      // cannot make us hold all of it.
      yield { line: line + 1, tooLong: true };
      skipping = true;
    }
    if (skipping) buf = "";
    if (final && buf.length > 0) {
      line++;
      const text = buf.charCodeAt(buf.length - 1) === 13 ? buf.slice(0, -1) : buf;
      buf = "";
      yield { line, text };
    }
  };
  for await (const chunk of source) {
    yield* take(typeof chunk === "string" ? chunk : decoder.decode(chunk, { stream: true }), false);
  }
  yield* take(decoder.decode(), true);
}

function* linesOfText(text: string, complete: boolean): Generator<RawLine> {
  let body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  // A cut-off sample: drop the last, possibly incomplete, line.
  if (!complete) {
    const nl = body.lastIndexOf("\n");
    body = nl >= 0 ? body.slice(0, nl + 1) : "";
  }
  const parts = body.split("\n");
  if (parts.length > 0 && parts[parts.length - 1] === "") parts.pop();
  for (let i = 0; i < parts.length; i++) {
    let t = parts[i]!;
    if (t.endsWith("\r")) t = t.slice(0, -1);
    if (t.length > MAX_LINE_CHARS) yield { line: i + 1, tooLong: true };
    else yield { line: i + 1, text: t };
  }
}

// ── fields ────────────────────────────────────────────────────────────────────────────────────

/** Splits one line into trimmed fields; a string result is why the line is broken. */
export function splitFields(text: string, delimiter: Delimiter): string[] | string {
  if (text.indexOf('"') < 0) {
    const parts = text.split(delimiter);
    for (let i = 0; i < parts.length; i++) parts[i] = parts[i]!.trim();
    return parts;
  }
  const out: string[] = [];
  let i = 0;
  const n = text.length;
  for (;;) {
    while (i < n && (text[i] === " " || (text[i] === "\t" && delimiter !== "\t"))) i++;
    if (text[i] === '"') {
      const open = i;
      i++;
      let value = "";
      for (;;) {
        const q = text.indexOf('"', i);
        if (q < 0) return `the quoted field starting at character ${open + 1} is not closed on this line (quoted line breaks are not supported)`;
        value += text.slice(i, q);
        if (text[q + 1] === '"') {
          value += '"';
          i = q + 2;
        } else {
          i = q + 1;
          break;
        }
      }
      while (i < n && text[i] === " ") i++;
      out.push(value);
      if (i >= n) return out;
      if (text[i] !== delimiter) return `unexpected text after the closing quote at character ${i + 1}`;
      i++;
    } else {
      const d = text.indexOf(delimiter, i);
      const end = d < 0 ? n : d;
      out.push(text.slice(i, end).trim());
      if (d < 0) return out;
      i = d + 1;
    }
  }
}

function countOutsideQuotes(text: string, ch: string): number {
  let inQ = false;
  let c = 0;
  for (let i = 0; i < text.length; i++) {
    const x = text[i];
    if (x === '"') inQ = !inQ;
    else if (!inQ && x === ch) c++;
  }
  return c;
}

export function detectDelimiter(headerText: string): Delimiter | null {
  let best: Delimiter | null = null;
  let bestCount = 0;
  for (const d of DELIMITERS) {
    const c = countOutsideQuotes(headerText, d);
    if (c > bestCount) {
      best = d;
      bestCount = c;
    }
  }
  return best;
}

// ── values ────────────────────────────────────────────────────────────────────────────────────

const NUMBER_RE = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

/** A strict decimal number (no units, no thousands separators); null when it is not one. */
export function parseNumber(s: string, decimalComma = false): number | null {
  let t = s.trim();
  if (decimalComma && t.indexOf(",") >= 0 && t.indexOf(".") < 0) t = t.replace(",", ".");
  if (!NUMBER_RE.test(t)) return null;
  const v = Number(t);
  return Number.isFinite(v) ? v : null;
}

const DATE_TIME_RE =
  /^(\d{4})[-/](\d{2})[-/](\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,9}))?)?\s*(Z|UTC|GMT|[+-]\d{2}(?::?\d{2})?)?$/i;

export function looksLikeDateTime(s: string): boolean {
  return DATE_TIME_RE.test(s.trim());
}
function hasExplicitOffset(s: string): boolean {
  const m = DATE_TIME_RE.exec(s.trim());
  return !!m && !!m[8];
}
function saysUtc(s: string): boolean {
  const m = DATE_TIME_RE.exec(s.trim());
  return !!m && !!m[8] && /^(Z|UTC|GMT|[+-]00(:?00)?)$/i.test(m[8]);
}

const DAYS_IN_MONTH = [31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

/** Checks an IANA zone name ("UTC" is accepted too). */
export function isValidTimeZone(zone: string): boolean {
  return zone === "UTC" || IANAZone.isValidZone(zone);
}

/**
 * Wall-clock → instant for one zone. Offsets are looked up once per local hour and reused when the
 * whole hour has one unambiguous offset (true of every hour but those holding a change), because the
 * zone lookup (Intl) costs microseconds and a year of minute readings has half a million rows.
 * Returns the epoch ms, or null for a wall time that does not exist (spring-forward gap).
 */
export function wallClockResolver(zoneName: string): (naiveUtcMs: number) => number | null {
  if (zoneName === "UTC") return (naive) => naive;
  const zone = IANAZone.create(zoneName);
  if (!zone.isValid) throw new LogFormatError(`"${zoneName}" is not a known IANA time zone`);
  const DAY = 86_400_000;
  const HOUR = 3_600_000;
  // Every instant a wall time can map to, earliest first. Assumes no two offset changes within a
  // day of each other, which holds for every zone in the tz database since 2000.
  const candidates = (naive: number): { ts: number; off: number }[] => {
    const out: { ts: number; off: number }[] = [];
    for (const off of new Set([zone.offset(naive - DAY), zone.offset(naive + DAY)])) {
      const ts = naive - off * 60_000;
      if (zone.offset(ts) === off) out.push({ ts, off });
    }
    return out.sort((a, b) => a.ts - b.ts);
  };
  const hourOffsets = new Map<number, number>();
  return (naive) => {
    const key = Math.floor(naive / HOUR);
    let off = hourOffsets.get(key);
    if (off === undefined) {
      const a = candidates(key * HOUR);
      const b = candidates(key * HOUR + HOUR - 1);
      off = a.length === 1 && b.length === 1 && a[0]!.off === b[0]!.off ? a[0]!.off : Number.NaN;
      if (hourOffsets.size > 50_000) hourOffsets.clear();
      hourOffsets.set(key, off);
    }
    if (!Number.isNaN(off)) return naive - off * 60_000;
    const c = candidates(naive);
    return c.length === 0 ? null : c[0]!.ts; // the earlier instant of an overlap (see the header)
  };
}

/** Parses a time value; a string result is the reason it was refused. */
export function parseTimeValue(raw: string, zoneName: string, resolve: (naive: number) => number | null): Date | string {
  const s = raw.trim();
  const shown = s.length > 40 ? `${s.slice(0, 40)}…` : s;
  if (s === "") return "the time is empty";
  const m = DATE_TIME_RE.exec(s);
  if (!m)
    return `time "${shown}" is not a date-time (expected YYYY-MM-DD HH:MM:SS, local or with an offset such as Z or +01:00)`;
  const y = Number(m[1]);
  const mo = Number(m[2]);
  const d = Number(m[3]);
  const h = Number(m[4]);
  const mi = Number(m[5]);
  const sec = m[6] ? Number(m[6]) : 0;
  const ms = m[7] ? Math.floor(Number(`0.${m[7]}`) * 1000) : 0;
  const leap = (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;
  if (mo < 1 || mo > 12 || d < 1 || d > (mo === 2 && !leap ? 28 : DAYS_IN_MONTH[mo - 1]!) || h > 23 || mi > 59 || sec > 59)
    return `time "${shown}" is not a real date and time`;
  const naive = Date.UTC(y, mo - 1, d, h, mi, sec, ms);
  const zone = m[8];
  if (zone) {
    const z = zone.toUpperCase();
    if (z === "Z" || z === "UTC" || z === "GMT") return new Date(naive);
    const sign = z[0] === "-" ? -1 : 1;
    const digits = z.slice(1).replace(":", "");
    const oh = Number(digits.slice(0, 2));
    const om = digits.length > 2 ? Number(digits.slice(2, 4)) : 0;
    if (oh > 14 || om > 59) return `time "${shown}" has an impossible offset ${zone}`;
    return new Date(naive - sign * (oh * 60 + om) * 60_000);
  }
  const ts = resolve(naive);
  if (ts === null) return `time "${shown}" does not exist in ${zoneName} (DST change)`;
  return new Date(ts);
}

// ── the line state machine shared by sniff and the stream ─────────────────────────────────────

type Classified =
  | { kind: "skip" }
  | { kind: "header"; header: LogHeader; dataValues?: string[] }
  | { kind: "row"; line: number; values: string[] }
  | { kind: "bad"; line: number; reason: string };

function uniqueNames(names: string[]): string[] {
  const seen = new Map<string, number>();
  return names.map((n, i) => {
    const base = n === "" ? `column ${i + 1}` : n;
    const c = (seen.get(base) ?? 0) + 1;
    seen.set(base, c);
    return c === 1 ? base : `${base} (${c})`;
  });
}

function looksLikeValue(s: string): boolean {
  return parseNumber(s, true) !== null || looksLikeDateTime(s);
}

class LineClassifier {
  header: LogHeader | null = null;
  private metadata: Record<string, string> = {};
  private metaCount = 0;

  constructor(private readonly forcedDelimiter?: Delimiter) {}

  push(raw: RawLine): Classified {
    if ("tooLong" in raw) {
      if (!this.header) throw new LogFormatError(`line ${raw.line} is longer than ${MAX_LINE_CHARS} characters; is this a text log?`, raw.line);
      return { kind: "bad", line: raw.line, reason: `the line is longer than ${MAX_LINE_CHARS} characters` };
    }
    const text = raw.text;
    const trimmed = text.trim();
    if (trimmed === "") return { kind: "skip" };
    if (trimmed.startsWith("#")) {
      if (!this.header && this.metaCount < MAX_METADATA_ENTRIES) {
        const m = /^#+\s*([^:]{1,100}?)\s*:\s*(.*)$/.exec(trimmed);
        if (m && m[1]) {
          this.metadata[m[1]] = m[2]!.trim().slice(0, 500);
          this.metaCount++;
        }
      }
      return { kind: "skip" };
    }
    if (!this.header) {
      const delimiter = this.forcedDelimiter ?? detectDelimiter(text);
      if (!delimiter)
        throw new LogFormatError(
          `line ${raw.line} (the header row) has no comma, semicolon or tab, so its columns cannot be told apart`,
          raw.line,
        );
      const fields = splitFields(text, delimiter);
      if (typeof fields === "string") throw new LogFormatError(`line ${raw.line} (the header row): ${fields}`, raw.line);
      while (fields.length > 1 && fields[fields.length - 1] === "") fields.pop();
      const hasHeader = !fields.some((f) => f !== "" && looksLikeValue(f));
      const columns = hasHeader ? uniqueNames(fields) : fields.map((_, i) => `column ${i + 1}`);
      if (columns.length < 2)
        throw new LogFormatError(`line ${raw.line} (the header row) has a single column; a log needs at least a time and a brightness`, raw.line);
      this.header = { delimiter, hasHeader, headerLine: raw.line, columns, metadata: this.metadata };
      return hasHeader ? { kind: "header", header: this.header } : { kind: "header", header: this.header, dataValues: fields };
    }
    return this.row(raw.line, text);
  }

  row(line: number, text: string): Classified {
    const h = this.header!;
    const values = splitFields(text, h.delimiter);
    if (typeof values === "string") return { kind: "bad", line, reason: values };
    const want = h.columns.length;
    if (values.length > want) {
      // Trailing empty fields (a delimiter at the end of each line) are harmless.
      for (let i = want; i < values.length; i++)
        if (values[i] !== "") return { kind: "bad", line, reason: `${values.length} fields where the header has ${want} (${delimiterName(h.delimiter)}-separated)` };
      values.length = want;
    }
    if (values.length < want) return { kind: "bad", line, reason: `${values.length} field${values.length === 1 ? "" : "s"} where the header has ${want} (${delimiterName(h.delimiter)}-separated)` };
    return { kind: "row", line, values };
  }
}

// ── preview ───────────────────────────────────────────────────────────────────────────────────

const UTC_NAME_RE = /utc|gmt|\bz\b|zulu/i;
const TIME_NAME_RE = /time|date|when|stamp/i;
const MAG_NAME_RE = /mag|bright|arcsec|mpsas|msas|sky|zenith/i;
const TEMP_NAME_RE = /temp|celsius|°c|degc|deg_c/i;

function guessMapping(columns: string[], rows: string[][], stationTimeZone: string | undefined, decimalComma: boolean): GuessedMapping {
  const col = (i: number) => rows.map((r) => r[i] ?? "").filter((v) => v !== "");
  const share = (i: number, pred: (v: string) => boolean) => {
    const vs = col(i);
    return vs.length === 0 ? 0 : vs.filter(pred).length / vs.length;
  };
  const idx = columns.map((_, i) => i);
  const timeCols = idx.filter((i) => share(i, looksLikeDateTime) >= 0.5);
  const utcCol =
    timeCols.find((i) => UTC_NAME_RE.test(columns[i]!)) ?? timeCols.find((i) => share(i, saysUtc) >= 0.5) ?? timeCols.find((i) => share(i, hasExplicitOffset) >= 0.5);
  const fallbackTime = timeCols.find((i) => TIME_NAME_RE.test(columns[i]!)) ?? timeCols[0];
  const timeIdx = utcCol ?? fallbackTime;
  const timeZone = utcCol !== undefined ? "UTC" : (stationTimeZone ?? "UTC");

  const numeric = idx.filter((i) => i !== timeIdx && !timeCols.includes(i) && share(i, (v) => parseNumber(v, decimalComma) !== null) >= 0.5);
  const median = (i: number) => {
    const vs = col(i)
      .map((v) => parseNumber(v, decimalComma))
      .filter((v): v is number => v !== null)
      .sort((a, b) => a - b);
    return vs.length ? vs[Math.floor(vs.length / 2)]! : Number.NaN;
  };
  const magIdx =
    numeric.find((i) => MAG_NAME_RE.test(columns[i]!) && !TEMP_NAME_RE.test(columns[i]!)) ??
    numeric.find((i) => !TEMP_NAME_RE.test(columns[i]!) && median(i) >= 10 && median(i) <= 23);
  const tempIdx = numeric.find((i) => i !== magIdx && TEMP_NAME_RE.test(columns[i]!));
  return {
    timeColumn: timeIdx === undefined ? null : columns[timeIdx]!,
    timeZone,
    magColumn: magIdx === undefined ? null : columns[magIdx]!,
    tempColumn: tempIdx === undefined ? null : columns[tempIdx]!,
  };
}

/**
 * The preview of a file from its first bytes (SNIFF_BYTES is plenty): delimiter, metadata, columns,
 * the first rows and a guessed mapping. `complete` says the bytes are the whole file (otherwise the
 * last, possibly cut, line is ignored). Throws LogFormatError when no usable header row is found.
 */
export function sniff(firstBytes: Uint8Array | string, opts: { stationTimeZone?: string; complete?: boolean } = {}): SniffResult {
  const text = typeof firstBytes === "string" ? firstBytes : new TextDecoder("utf-8").decode(firstBytes);
  const complete = opts.complete ?? typeof firstBytes === "string";
  const c = new LineClassifier();
  const sampleRows: SampleRow[] = [];
  let header: LogHeader | null = null;
  for (const raw of linesOfText(text, complete)) {
    if (sampleRows.length >= SAMPLE_ROW_COUNT) break;
    const r = c.push(raw);
    if (r.kind === "header") {
      header = r.header;
      if (r.dataValues) sampleRows.push({ line: raw.line, values: r.dataValues });
    } else if (r.kind === "row") sampleRows.push({ line: r.line, values: r.values });
    else if (r.kind === "bad") {
      const split = "text" in raw ? splitFields(raw.text, c.header!.delimiter) : [];
      const values = typeof split === "string" ? ["text" in raw ? raw.text : ""] : split;
      sampleRows.push({ line: r.line, values, reason: r.reason });
    }
  }
  if (!header) {
    throw new LogFormatError(
      text.trim() === ""
        ? "the file is empty"
        : `no header row found${complete ? "" : ` in the first ${Math.round(text.length / 1024)} KB`}: only # lines and empty lines`,
    );
  }
  const good = sampleRows.filter((r) => !r.reason).map((r) => r.values);
  return {
    delimiter: header.delimiter,
    hasHeader: header.hasHeader,
    headerLine: header.headerLine,
    metadata: header.metadata,
    columns: header.columns,
    sampleRows,
    guessedMapping: guessMapping(header.columns, good, opts.stationTimeZone, header.delimiter === ";"),
  };
}

// ── the stream ────────────────────────────────────────────────────────────────────────────────

/**
 * Every data row of a file, in order: `{line, values}`, or `{line, reason}` for a broken line (wrong
 * number of fields, an unclosed quote, too long). Memory does not grow with the file: one line at a
 * time. `onHeader` is called once, before the first row. Throws LogFormatError when the file has
 * no header row at all.
 */
export async function* readLogRows(
  source: AsyncIterable<Uint8Array | string>,
  opts: { delimiter?: Delimiter; onHeader?: (h: LogHeader) => void } = {},
): AsyncGenerator<LogRow> {
  const c = new LineClassifier(opts.delimiter);
  for await (const raw of readLines(source)) {
    const r = c.push(raw);
    if (r.kind === "skip") continue;
    if (r.kind === "header") {
      opts.onHeader?.(r.header);
      if (r.dataValues) yield { line: r.header.headerLine, values: r.dataValues };
    } else if (r.kind === "row") yield { line: r.line, values: r.values };
    else yield { line: r.line, reason: r.reason };
  }
  if (!c.header) throw new LogFormatError("the file has no header row and no data: only # lines and empty lines");
}

/**
 * Turns one row's fields into a reading with a mapping; a string result is why the row was refused.
 * Built once per file (column positions, zone resolver); throws LogFormatError for a mapping that
 * names a column the file does not have.
 */
export function rowInterpreter(columns: string[], mapping: Omit<LogMapping, "delimiter"> & { delimiter?: Delimiter }) {
  const find = (name: string, what: string) => {
    const i = columns.indexOf(name);
    if (i < 0) throw new LogFormatError(`the ${what} column "${name}" is not in the file (its columns: ${columns.join(", ")})`);
    return i;
  };
  if (!isValidTimeZone(mapping.timeZone)) throw new LogFormatError(`"${mapping.timeZone}" is not a known IANA time zone`);
  const ti = find(mapping.timeColumn, "time");
  const mi = find(mapping.magColumn, "brightness");
  const ci = mapping.tempColumn ? find(mapping.tempColumn, "temperature") : -1;
  const decimalComma = mapping.delimiter === ";";
  const resolve = wallClockResolver(mapping.timeZone);
  const magName = mapping.magColumn;
  const tempName = mapping.tempColumn ?? "";
  return (values: string[]): { takenAt: Date; mag: number; tempC: number | null } | string => {
    const t = parseTimeValue(values[ti] ?? "", mapping.timeZone, resolve);
    if (typeof t === "string") return t;
    const rawMag = values[mi] ?? "";
    if (rawMag === "") return `the brightness ("${magName}") is empty`;
    const mag = parseNumber(rawMag, decimalComma);
    if (mag === null) return `brightness "${rawMag.slice(0, 40)}" ("${magName}") is not a number`;
    let tempC: number | null = null;
    if (ci >= 0) {
      const rawT = values[ci] ?? "";
      if (rawT !== "") {
        tempC = parseNumber(rawT, decimalComma);
        if (tempC === null) return `temperature "${rawT.slice(0, 40)}" ("${tempName}") is not a number`;
      }
    }
    return { takenAt: t, mag, tempC };
  };
}

/** readLogRows + rowInterpreter: readings or refusals, each with its line number. */
export async function* readLogReadings(
  source: AsyncIterable<Uint8Array | string>,
  mapping: LogMapping,
  opts: { onHeader?: (h: LogHeader) => void } = {},
): AsyncGenerator<LogReading> {
  let interpret: ReturnType<typeof rowInterpreter> | null = null;
  for await (const row of readLogRows(source, {
    delimiter: mapping.delimiter,
    onHeader: (h) => {
      interpret = rowInterpreter(h.columns, mapping);
      opts.onHeader?.(h);
    },
  })) {
    if ("reason" in row) {
      yield row;
      continue;
    }
    const r = interpret!(row.values);
    if (typeof r === "string") yield { line: row.line, reason: r };
    else yield { line: row.line, ...r };
  }
}
