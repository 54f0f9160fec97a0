import { ZodError } from "zod";
import { AppError, isTransientDbError } from "@/lib/errors";

/** What every form action of this feature returns: a success line, a form-level error, or field errors. */
export type FormState<T = unknown> = {
  ok?: string;
  error?: string;
  fieldErrors?: Record<string, string>;
  data?: T;
  /** What was typed, handed back on an error so the form (which React resets after an action) can refill it. */
  values?: Record<string, string>;
};

/**
 * Maps a verb's thrown error to what a form shows. AppErrors may name the field they concern in
 * `details.field`; anything unexpected is logged and shown as a generic line, never its message.
 */
export function formError(err: unknown): FormState<never> {
  if (err instanceof ZodError) {
    const fieldErrors: Record<string, string> = {};
    for (const i of err.issues) fieldErrors[String(i.path[0] ?? "form")] ??= i.message;
    return { fieldErrors, error: "Check the highlighted fields." };
  }
  if (err instanceof AppError) {
    const field = (err.details as { field?: string } | undefined)?.field;
    return field ? { fieldErrors: { [field]: err.message } } : { error: err.message };
  }
  if (isTransientDbError(err)) return { error: "The database is not reachable right now. Try again shortly." };
  // Next's redirect/notFound are errors too: let them through.
  if (err && typeof err === "object" && "digest" in err) throw err;
  console.error("[nightmark] form action failed", err);
  return { error: "Something went wrong on our side. It has been logged." };
}

/** FormData to a plain object (last value wins; repeated keys become arrays when listed). */
export function formObject(form: FormData, arrays: string[] = []): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const key of new Set(form.keys())) {
    if (key.startsWith("$ACTION")) continue;
    out[key] = arrays.includes(key) ? form.getAll(key).map(String) : String(form.get(key));
  }
  for (const a of arrays) out[a] ??= [];
  return out;
}

/** Runs a verb for a form action: the success line, or the error mapped for the form. */
export async function runForm<T>(fn: () => Promise<T>, ok: string | ((r: T) => string), form?: FormData): Promise<FormState<T>> {
  try {
    const r = await fn();
    return { ok: typeof ok === "string" ? ok : ok(r), data: r };
  } catch (err) {
    const state: FormState<T> = formError(err);
    if (form) state.values = echoValues(form);
    return state;
  }
}

/** Never echo secrets or link tokens back. */
function echoValues(form: FormData): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of form.entries()) {
    if (k.startsWith("$ACTION") || /password|confirm|current|token/i.test(k) || typeof v !== "string") continue;
    out[k] = v.slice(0, 2000);
  }
  return out;
}
