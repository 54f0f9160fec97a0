import type { Db } from "@/db";
import { auditLog } from "@/db/schema";
import { bumpDataVersion } from "@/lib/cache/data-version";

export type AuditEntry = {
  actorId: string | null;
  action: string;
  entityType: "user" | "site" | "station" | "token" | "alert_rule" | "calibration" | "invitation" | "upload" | "brief";
  entityId: string;
  before?: unknown;
  after?: unknown;
};

/** Every change to roles, sites, stations, tokens, alert rules and calibration goes through here. */
export async function recordAudit(db: Pick<Db, "insert" | "execute">, entry: AuditEntry) {
  // Every audited change can change what read routes show: let their caches know.
  await bumpDataVersion(db);
  await db.insert(auditLog).values({
    actorId: entry.actorId,
    action: entry.action,
    entityType: entry.entityType,
    entityId: entry.entityId,
    before: entry.before ?? null,
    after: entry.after ?? null,
  });
}
