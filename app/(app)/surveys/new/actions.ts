"use server";

import { ZodError } from "zod";
import { context, requireRole } from "@/lib/auth/guard";
import { formError } from "@/lib/people/form-state";
import { createSurvey, describeSurveyIssue, type CreateSurveyInput } from "@/lib/surveys/service";

export type SurveyActionState = { ok?: true; id?: string; error?: string; issues?: { path: string; message: string }[] };

/** Stores a walk. Field errors come back keyed by path (spots.1.readings.2) with a sentence naming the spot and reading. */
export async function createSurveyAction(input: CreateSurveyInput): Promise<SurveyActionState> {
  const ctx = await context();
  try {
    requireRole(ctx, "volunteer", "steward");
    const r = await createSurvey({ ctx, input });
    return { ok: true, id: r.survey.id };
  } catch (err) {
    if (err instanceof ZodError)
      return {
        error: "Some entries need attention; each is listed below and beside its field.",
        issues: err.issues.map((i) => ({ path: i.path.join("."), message: describeSurveyIssue(i.path, i.message) })),
      };
    return { error: formError(err).error ?? "The walk was not saved." };
  }
}
