"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { context, requireRole } from "@/lib/auth/guard";
import { createDefaultRules, updateRule } from "@/lib/alerts/service";
import { runForm, type FormState } from "@/lib/people/form-state";

/** Form fields: ruleId, enabled (checkbox), p.<param>, p.baseline.<field>; numbers stay strings for zod to coerce. */
function paramsFrom(form: FormData): Record<string, unknown> {
  const params: Record<string, unknown> = {};
  const baseline: Record<string, unknown> = {};
  for (const [k, v] of form.entries()) {
    if (typeof v !== "string" || !k.startsWith("p.")) continue;
    const key = k.slice(2);
    if (key.startsWith("baseline.")) {
      if (v !== "") baseline[key.slice(9)] = v;
    } else params[key] = v;
  }
  if (Object.keys(baseline).length) {
    const kind = baseline.kind;
    params.baseline =
      kind === "period"
        ? { kind, from: baseline.from, to: baseline.to }
        : kind === "year"
          ? { kind, year: baseline.year }
          : { kind: "years-back", years: baseline.years ?? 1 };
  }
  return params;
}

export async function saveRuleAction(_prev: FormState, form: FormData): Promise<FormState> {
  const ctx = await context();
  const r = await runForm(
    async () => {
      requireRole(ctx, "steward");
      return updateRule({
        ctx,
        input: {
          ruleId: z.string().parse(form.get("ruleId")),
          enabled: form.get("enabled") === "on",
          params: paramsFrom(form),
        },
      });
    },
    "Saved. The next evaluation uses the new settings.",
    form,
  );
  if (r.ok) revalidatePath("/alerts/rules");
  return { ...r, data: undefined };
}

export async function createDefaultRulesAction(
  _prev: FormState,
  form: FormData,
): Promise<FormState> {
  const ctx = await context();
  const r = await runForm(
    async () => {
      requireRole(ctx, "steward");
      return createDefaultRules({ ctx, input: { slug: String(form.get("slug") ?? "") } });
    },
    (created) =>
      created.length
        ? `Added ${created.length} default rule${created.length === 1 ? "" : "s"}.`
        : "This site already has every kind of rule.",
  );
  if (r.ok) revalidatePath("/alerts/rules");
  return { ...r, data: undefined };
}
