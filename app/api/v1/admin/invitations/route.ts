import { NextResponse } from "next/server";
import { context, requireRole } from "@/lib/auth/guard";
import { badRequest } from "@/lib/errors";
import { route } from "@/lib/http/respond";
import { inviteUser } from "@/lib/people/invitations";
import { inviteSchema } from "@/lib/people/schemas";

export const dynamic = "force-dynamic";

/** POST /api/v1/admin/invitations {email, role, siteIds?} — e-mails a one-use invitation link (7 days). */
export const POST = route(async (req: Request) => {
  const ctx = await context();
  requireRole(ctx, "admin");
  const input = inviteSchema.parse(await req.json().catch(() => {
    throw badRequest("Send a JSON body.");
  }));
  const inv = await inviteUser({ ctx, input });
  return NextResponse.json({ invitation: inv }, { status: 201 });
});
