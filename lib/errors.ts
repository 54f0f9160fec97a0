/**
 * Typed errors raised by lib/ verbs. One function (lib/http/respond.ts) maps them to HTTP replies;
 * no internal message, stack or SQL reaches a response.
 */
export class AppError extends Error {
  constructor(
    readonly code: string,
    readonly status: number,
    message: string,
    readonly details?: unknown,
    readonly headers?: Record<string, string>,
  ) {
    super(message);
    this.name = "AppError";
  }
}

export const badRequest = (message: string, details?: unknown) =>
  new AppError("bad_request", 400, message, details);
export const unauthorized = (message = "Sign in, or send a valid station token.") =>
  new AppError("unauthorized", 401, message);
export const forbidden = (message = "You do not have permission to do that.") =>
  new AppError("forbidden", 403, message);
/** Also used for things that exist but that the caller may not see, so existence is not revealed. */
export const notFound = (what = "The requested item") => new AppError("not_found", 404, `${what} was not found.`);
export const conflict = (message: string, details?: unknown) => new AppError("conflict", 409, message, details);
export const payloadTooLarge = (message: string) => new AppError("payload_too_large", 413, message);
export const unsupportedMediaType = (message: string) => new AppError("unsupported_media_type", 415, message);
export const unprocessable = (message: string, details?: unknown) =>
  new AppError("unprocessable", 422, message, details);
export const rateLimited = (retryAfterSec: number, message = "Too many requests.") =>
  new AppError("rate_limited", 429, `${message} Try again in ${retryAfterSec} s.`, undefined, {
    "Retry-After": String(retryAfterSec),
  });
export const unavailable = (message = "The database is not reachable right now. Retry shortly.", retryAfterSec = 5) =>
  new AppError("unavailable", 503, message, undefined, { "Retry-After": String(retryAfterSec) });

const TRANSIENT_CODES = new Set(["ECONNREFUSED", "ECONNRESET", "ETIMEDOUT", "EPIPE", "57P01", "57P02", "57P03", "08000", "08003", "08006", "08001", "08004", "53300"]);
const TRANSIENT_MESSAGE =
  /Connection terminated|timeout exceeded when trying to connect|the database system is (starting up|shutting down)|Client has encountered a connection error|terminating connection due to administrator command|Cannot use a pool after calling end/i;

/**
 * PostgreSQL or network errors that mean "try again later", not "your input is bad". Looks through
 * the `cause` chain: drizzle wraps every driver error in a DrizzleQueryError ("Failed query: …")
 * whose cause is the pg error, and an AggregateError (connect to several addresses) lists its own.
 */
export function isTransientDbError(err: unknown, depth = 0): boolean {
  const e = err as { code?: string; message?: string; cause?: unknown; errors?: unknown[] } | null;
  if (!e || typeof e !== "object" || depth > 5) return false;
  if (TRANSIENT_CODES.has(e.code ?? "")) return true;
  if (TRANSIENT_MESSAGE.test(e.message ?? "")) return true;
  if (Array.isArray(e.errors) && e.errors.some((x) => isTransientDbError(x, depth + 1))) return true;
  return e.cause !== undefined && isTransientDbError(e.cause, depth + 1);
}
