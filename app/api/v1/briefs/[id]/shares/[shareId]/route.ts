import { NextResponse } from "next/server";
import { context } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { revokeShare } from "@/lib/briefs/service";

export const dynamic = "force-dynamic";
type Params = { params: Promise<{ id: string; shareId: string }> };

/** DELETE /api/v1/briefs/{id}/shares/{shareId}: revokes the link (its URL answers 404 from now on). */
export const DELETE = route<Params>(async (_req, { params }) => {
  const { id, shareId } = await params;
  const ctx = await context();
  return NextResponse.json(await revokeShare({ ctx, input: { id, shareId } }));
});
