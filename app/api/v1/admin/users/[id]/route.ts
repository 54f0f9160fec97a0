import { NextResponse } from "next/server";
import { z } from "zod";
import { context, requireRole } from "@/lib/auth/guard";
import { badRequest } from "@/lib/errors";
import { route } from "@/lib/http/respond";
import { roleField, uuidField } from "@/lib/people/schemas";
import { setUserRole, setUserStatus } from "@/lib/people/users";

export const dynamic = "force-dynamic";

const body = z.object({ role: roleField.optional(), status: z.enum(["active", "suspended"]).optional() }).strict();

/** PATCH /api/v1/admin/users/:id {role?, status?} — change a person's role or suspend/unsuspend them. */
export const PATCH = route(async (req: Request, { params }: { params: Promise<{ id: string }> }) => {
  const ctx = await context();
  requireRole(ctx, "admin");
  const userId = uuidField.parse((await params).id);
  const input = body.parse(await req.json().catch(() => {
    throw badRequest("Send a JSON body.");
  }));
  if (!input.role && !input.status) throw badRequest("Send role or status.");
  const out: Record<string, unknown> = { id: userId };
  if (input.role) out.role = (await setUserRole({ ctx, input: { userId, role: input.role } })).role;
  if (input.status) out.status = (await setUserStatus({ ctx, input: { userId, status: input.status } })).status;
  return NextResponse.json(out);
});
