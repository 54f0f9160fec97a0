"use server";

import { revalidatePath } from "next/cache";
import { context, requireRole } from "@/lib/auth/guard";
import { formError, type FormState } from "@/lib/people/form-state";
import { deleteGlowEstimate, GLOW_ROLES, saveGlowEstimate, type SaveGlowInput } from "@/lib/glow-estimates/service";
import type { GlowSiteResult } from "@/db/schema";

export async function saveGlowEstimateAction(input: SaveGlowInput): Promise<FormState<{ id: string; results: GlowSiteResult[] }>> {
  const ctx = await context();
  try {
    requireRole(ctx, ...GLOW_ROLES);
    const r = await saveGlowEstimate({ ctx, input });
    revalidatePath("/glow");
    revalidatePath("/briefs");
    return { ok: `Saved. Attach it to a brief on the briefs page.`, data: r };
  } catch (err) {
    return formError(err);
  }
}

export async function deleteGlowEstimateAction(id: string): Promise<FormState> {
  const ctx = await context();
  try {
    requireRole(ctx, ...GLOW_ROLES);
    await deleteGlowEstimate({ ctx, input: { id } });
    revalidatePath("/glow");
    return { ok: "Deleted." };
  } catch (err) {
    return formError(err);
  }
}
