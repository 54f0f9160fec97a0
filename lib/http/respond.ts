import { NextResponse } from "next/server";
import { ZodError } from "zod";
import { AppError, isTransientDbError, unavailable } from "@/lib/errors";
import { isTransientStorageError } from "@/lib/storage/s3";

export function errorBody(code: string, message: string, details?: unknown) {
  return { error: details === undefined ? { code, message } : { code, message, details } };
}

/** The single mapping from a thrown error to an HTTP reply. */
export function toErrorResponse(err: unknown): NextResponse {
  if (err instanceof ZodError) {
    const details = err.issues.map((i) => ({ path: i.path.join("."), message: i.message }));
    const first = details[0];
    const message = first ? `${first.path || "body"}: ${first.message}` : "Invalid input.";
    return NextResponse.json(errorBody("invalid_input", message, details), { status: 400 });
  }
  if (err instanceof AppError) {
    return NextResponse.json(errorBody(err.code, err.message, err.details), {
      status: err.status,
      headers: err.headers,
    });
  }
  // The store first: its connection errors carry the same codes as the database's.
  if (isTransientStorageError(err))
    return toErrorResponse(unavailable("The file store is not answering right now; nothing was kept. Retry shortly.", 10));
  if (isTransientDbError(err)) return toErrorResponse(unavailable());
  console.error("[nightmark] unhandled error", err);
  return NextResponse.json(errorBody("internal", "Something went wrong on our side. It has been logged."), {
    status: 500,
  });
}

type Handler<C> = (req: Request, ctx: C) => Promise<Response>;

/** Wraps a route handler so every failure becomes a JSON error reply. */
export function route<C>(handler: Handler<C>): Handler<C> {
  return async (req, ctx) => {
    try {
      return await handler(req, ctx);
    } catch (err) {
      return toErrorResponse(err);
    }
  };
}
