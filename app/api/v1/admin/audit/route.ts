import { NextResponse } from "next/server";
import { context, requireRole } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { queryAuditLog } from "@/lib/people/audit-log";
import { auditQuerySchema } from "@/lib/people/schemas";

export const dynamic = "force-dynamic";

/** GET /api/v1/admin/audit — one page of the filtered audit log as JSON, admins only. */
export const GET = route(async (req: Request) => {
  const ctx = await context();
  requireRole(ctx, "admin");
  const input = auditQuerySchema.parse(Object.fromEntries(new URL(req.url).searchParams));
  const log = await queryAuditLog({ ctx, input });
  return NextResponse.json({ entries: log.rows, total: log.total, page: log.page, pageSize: log.pageSize }, { headers: { "Cache-Control": "no-store" } });
});
