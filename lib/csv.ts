/**
 * One CSV cell (RFC 4180): quoted when it holds a comma, a quote or a line break.
 * - `commentSafe`: also quote a value starting with '#', so it is never read as a `#` header line
 *   (the evidence exports start with such a block).
 * - `spreadsheetSafe`: prefix ' to a value starting with = + - @ tab or CR, so a spreadsheet does not
 *   run it as a formula (the audit log holds free text; numeric exports must not use this, since
 *   it would change negative numbers).
 * Dates as ISO 8601; objects as JSON; null and undefined as an empty cell.
 */
export function csvCell(v: unknown, opts: { commentSafe?: boolean; spreadsheetSafe?: boolean } = {}): string {
  if (v === null || v === undefined) return "";
  let s = v instanceof Date ? v.toISOString() : typeof v === "object" ? JSON.stringify(v) : String(v);
  if (opts.spreadsheetSafe && /^[=+\-@\t\r]/.test(s)) s = `'${s}`;
  const mustQuote = /[",\r\n]/.test(s) || (opts.commentSafe === true && s.startsWith("#"));
  return mustQuote ? `"${s.replace(/"/g, '""')}"` : s;
}
