import { NextResponse } from "next/server";
import { context, requireRole } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { userSearchSchema } from "@/lib/people/schemas";
import { listUsers } from "@/lib/people/users";

export const dynamic = "force-dynamic";

/** GET /api/v1/admin/users?q&role&status&page — admins search people. */
export const GET = route(async (req: Request) => {
  const ctx = await context();
  requireRole(ctx, "admin");
  const input = userSearchSchema.parse(Object.fromEntries(new URL(req.url).searchParams));
  const list = await listUsers({ ctx, input });
  return NextResponse.json({ users: list.rows, total: list.total, page: list.page, pageSize: list.pageSize });
});
