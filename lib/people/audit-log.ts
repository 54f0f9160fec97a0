import { and, desc, eq, gte, ilike, lt, or, sql, type SQL } from "drizzle-orm";
import type { z } from "zod";
import { auditLog, users } from "@/db/schema";
import { requireRole, type Ctx } from "@/lib/auth/guard";
import { auditQuerySchema, type AuditQuery } from "./schemas";
import { csvCell } from "@/lib/csv";

/** The CSV export stops here; narrow the filter for more (a plain safeguard for one response). */
export const AUDIT_CSV_MAX_ROWS = 100_000;

export const AUDIT_ENTITY_TYPES = ["user", "site", "station", "token", "alert_rule", "calibration", "invitation", "upload", "brief"] as const;

function conditions(q: AuditQuery): SQL | undefined {
  const where: SQL[] = [];
  if (q.actor) {
    const uuidLike = /^[0-9a-f-]{36}$/i.test(q.actor);
    where.push(uuidLike ? eq(auditLog.actorId, q.actor) : or(ilike(users.email, `%${esc(q.actor)}%`), ilike(users.name, `%${esc(q.actor)}%`))!);
  }
  if (q.entityType) where.push(eq(auditLog.entityType, q.entityType));
  if (q.action) where.push(ilike(auditLog.action, `${esc(q.action)}%`));
  // Dates are whole UTC days; "to" includes its day.
  if (q.from) where.push(gte(auditLog.at, new Date(`${q.from}T00:00:00Z`)));
  if (q.to) where.push(lt(auditLog.at, new Date(new Date(`${q.to}T00:00:00Z`).getTime() + 86_400_000)));
  return where.length ? and(...where) : undefined;
}

const esc = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

const columns = {
  id: auditLog.id,
  at: auditLog.at,
  actorId: auditLog.actorId,
  actorEmail: users.email,
  actorName: users.name,
  action: auditLog.action,
  entityType: auditLog.entityType,
  entityId: auditLog.entityId,
  before: auditLog.before,
  after: auditLog.after,
};

export async function queryAuditLog({ ctx, input }: { ctx: Ctx; input: z.input<typeof auditQuerySchema> }) {
  requireRole(ctx, "admin");
  const q = auditQuerySchema.parse(input);
  const cond = conditions(q);
  const [{ total }] = (await ctx.db
    .select({ total: sql<number>`count(*)::int` })
    .from(auditLog)
    .leftJoin(users, eq(users.id, auditLog.actorId))
    .where(cond)) as [{ total: number }];
  const rows = await ctx.db
    .select(columns)
    .from(auditLog)
    .leftJoin(users, eq(users.id, auditLog.actorId))
    .where(cond)
    .orderBy(desc(auditLog.at), desc(auditLog.id))
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize);
  return { rows, total, page: q.page, pageSize: q.pageSize, query: q };
}

export async function distinctAuditActions({ ctx }: { ctx: Ctx }) {
  requireRole(ctx, "admin");
  const rows = await ctx.db.selectDistinct({ action: auditLog.action }).from(auditLog).orderBy(auditLog.action).limit(200);
  return rows.map((r) => r.action);
}

/** RFC 4180 field; a leading = + - @ is defused for spreadsheets (the log holds free text). */
export const csvField = (v: unknown) => csvCell(v, { spreadsheetSafe: true });

export const AUDIT_CSV_HEADER = ["id", "at", "actor_id", "actor_email", "action", "entity_type", "entity_id", "before", "after"];

/** The whole filtered log as CSV (no paging), newest first. */
export async function auditLogCsv({ ctx, input }: { ctx: Ctx; input: z.input<typeof auditQuerySchema> }): Promise<string> {
  requireRole(ctx, "admin");
  const q = auditQuerySchema.parse(input);
  const rows = await ctx.db
    .select(columns)
    .from(auditLog)
    .leftJoin(users, eq(users.id, auditLog.actorId))
    .where(conditions(q))
    .orderBy(desc(auditLog.at), desc(auditLog.id))
    .limit(AUDIT_CSV_MAX_ROWS);
  const lines = [AUDIT_CSV_HEADER.join(",")];
  for (const r of rows) lines.push([r.id, r.at, r.actorId, r.actorEmail, r.action, r.entityType, r.entityId, r.before, r.after].map(csvField).join(","));
  return lines.join("\r\n") + "\r\n";
}
