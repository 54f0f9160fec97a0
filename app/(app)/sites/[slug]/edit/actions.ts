"use server";

import { redirect } from "next/navigation";
import { ZodError } from "zod";
import { context, requireUser } from "@/lib/auth/guard";
import { AppError } from "@/lib/errors";
import { parseBoundaryText } from "@/lib/sites/boundary";
import { siteUpdateSchema, updateSite } from "@/lib/sites/service";

export type EditSiteState = { ok: boolean; message?: string; fieldErrors: Record<string, string>; boundaryErrors: string[] };

// Server actions accept 1 MB bodies by default (next.config); keep the file under it.
const MAX_BOUNDARY_BYTES = 900_000;

export async function updateSiteAction(slug: string, _prev: EditSiteState, form: FormData): Promise<EditSiteState> {
  const ctx = await context();
  requireUser(ctx); // the verb checks the steward role; this refuses the signed-out before reading the file
  const boundaryErrors: string[] = [];
  let boundary: unknown = undefined;
  const file = form.get("boundary");
  if (file instanceof File && file.size > 0) {
    if (file.size > MAX_BOUNDARY_BYTES) boundaryErrors.push(`The file is ${(file.size / 1e6).toFixed(1)} MB; the limit is 0.9 MB (simplify the outline).`);
    else {
      const v = parseBoundaryText(await file.text());
      if (v.ok) boundary = v.boundary;
      else boundaryErrors.push(...v.errors);
    }
  }
  const zone = String(form.get("lightingZone") ?? "");
  const parsed = siteUpdateSchema.safeParse({
    name: form.get("name"),
    description: form.get("description") ?? "",
    timeZone: form.get("timeZone"),
    targetMag: form.get("targetMag"),
    sunMaxAltDeg: form.get("sunMaxAltDeg"),
    moonMaxAltDeg: form.get("moonMaxAltDeg"),
    cloudWindowMin: form.get("cloudWindowMin"),
    cloudSpreadMag: form.get("cloudSpreadMag"),
    isPublic: form.get("isPublic") === "on",
    roundPublicPositions: form.get("roundPublicPositions") === "on",
    lightingZone: zone === "" ? null : zone,
    boundary,
  });
  const fieldErrors: Record<string, string> = {};
  if (!parsed.success) for (const i of parsed.error.issues) fieldErrors[String(i.path[0])] ??= i.message;
  if (!parsed.success || boundaryErrors.length > 0) {
    return { ok: false, message: "Nothing was saved: fix the marked fields.", fieldErrors, boundaryErrors };
  }
  try {
    await updateSite({ ctx, input: { slug, changes: parsed.data } });
  } catch (err) {
    if (err instanceof AppError) return { ok: false, message: err.message, fieldErrors: {}, boundaryErrors: [] };
    if (err instanceof ZodError) return { ok: false, message: err.issues[0]?.message ?? "Invalid input.", fieldErrors: {}, boundaryErrors: [] };
    throw err;
  }
  redirect(`/sites/${slug}`);
}
