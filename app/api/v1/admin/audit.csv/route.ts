import { context, requireRole } from "@/lib/auth/guard";
import { route } from "@/lib/http/respond";
import { auditLogCsv } from "@/lib/people/audit-log";
import { auditQuerySchema } from "@/lib/people/schemas";

export const dynamic = "force-dynamic";

/** GET /api/v1/admin/audit.csv?actor&entityType&action&from&to — the filtered audit log, admins only. */
export const GET = route(async (req: Request) => {
  const ctx = await context();
  requireRole(ctx, "admin");
  const input = auditQuerySchema.parse(Object.fromEntries(new URL(req.url).searchParams));
  const csv = await auditLogCsv({ ctx, input });
  const day = new Date().toISOString().slice(0, 10);
  return new Response(csv, {
    headers: {
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Disposition": `attachment; filename="nightmark-audit-${day}.csv"`,
      "Cache-Control": "no-store",
    },
  });
});
