/**
 * Alert evaluation for a site: every enabled rule's condition (lib/alerts/conditions.ts) is
 * computed from the site's nightly values, and alerts are opened, updated or cleared.
 *
 * Concurrency: the whole evaluation of a site runs in one transaction holding a transaction-level
 * advisory lock on the site, so two evaluations of a site run one after the other; and the partial
 * unique index alerts_one_active_idx (one open-or-acknowledged alert per rule and target) backs the
 * INSERT … ON CONFLICT … DO UPDATE, so even without the lock no duplicate can be created.
 * E-mail: an 'opened' event writes one outbox row per steward (UNIQUE (event, recipient), ON
 * CONFLICT DO NOTHING) in the same transaction; the send jobs are enqueued after the commit, and
 * sweepOutbox re-enqueues any row whose job was lost.
 */
import { and, asc, eq, inArray, sql } from "drizzle-orm";
import { getDb, type Db } from "@/db";
import {
  alertEvents,
  alertRules,
  alerts,
  siteStewards,
  sites,
  stations,
  users,
  type AlertRuleKind,
} from "@/db/schema";
import { addDays, nightOf } from "@/ingest/night";
import { env } from "@/lib/env";
import { loadSiteNights, dayNumber, type NightValue } from "@/lib/trends/site-trend";
import { evaluateCondition, type Outcome, type StationReports } from "./conditions";
import { buildAlertMail } from "./email";
import { addToOutbox, enqueueOutbox, ensureNotificationSettings, sweepOutbox } from "./outbox";
import { DEFAULT_RULE_PARAMS, RULE_KIND_ORDER, safeRuleParams } from "./rules";

/** First key of the two-key advisory lock: "alerts" (any constant, shared by every evaluator). */
const LOCK_NAMESPACE = 0x416c7274;

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

export type EvaluationReport = {
  siteId: string;
  slug: string;
  rulesCreated: number;
  opened: { alertId: string; kind: AlertRuleKind; targetKey: string; summary: string }[];
  updated: number;
  cleared: number;
  outboxIds: string[];
};

/** Inserts the default rules for a site that has no rules at all; returns how many were created. */
export async function createDefaultRulesIfNone(
  tx: Pick<Db, "select" | "insert">,
  siteId: string,
  actorId: string | null,
): Promise<number> {
  const existing = await tx
    .select({ id: alertRules.id })
    .from(alertRules)
    .where(eq(alertRules.siteId, siteId))
    .limit(1);
  if (existing.length > 0) return 0;
  const rows = RULE_KIND_ORDER.map((kind) => ({
    siteId,
    kind,
    params: DEFAULT_RULE_PARAMS[kind] as Record<string, unknown>,
    createdBy: actorId,
    updatedBy: actorId,
  }));
  await tx.insert(alertRules).values(rows);
  return rows.length;
}

async function stationReports(tx: Tx, siteId: string): Promise<StationReports[]> {
  const list = await tx
    .select({ id: stations.id, name: stations.name, slug: stations.slug })
    .from(stations)
    .where(
      and(
        eq(stations.siteId, siteId),
        eq(stations.approval, "approved"),
        eq(stations.status, "active"),
      ),
    )
    .orderBy(asc(stations.name));
  if (list.length === 0) return [];
  // The last 30 nights each station reported (any readings), enough for its usual reporting rate.
  const rows = await tx.execute<{ station_id: string; night: string }>(sql`
    SELECT station_id, night::text AS night FROM (
      SELECT ns.station_id, ns.night, row_number() OVER (PARTITION BY ns.station_id ORDER BY ns.night DESC) AS rn
        FROM night_summaries ns
       WHERE ns.station_id IN (${sql.join(
         list.map((s) => sql`${s.id}::uuid`),
         sql`, `,
       )}) AND ns.readings > 0
    ) x WHERE rn <= 30`);
  const by = new Map<string, string[]>();
  for (const r of rows.rows)
    by.set(r.station_id, [...(by.get(r.station_id) ?? []), String(r.night).slice(0, 10)]);
  return list.map((s) => ({ ...s, reportedNights: by.get(s.id) ?? [] }));
}

function newNightsSince(outcome: Outcome, values: NightValue[], prev: string | null): number {
  if (!outcome.night) return 0;
  if (!prev) return 1;
  if (outcome.stationId) return Math.max(0, Math.round(dayNumber(outcome.night) - dayNumber(prev)));
  return values.filter((v) => v.night > prev).length;
}

/** Evaluates one site's rules. `now` sets the reference night (the last complete night). */
export async function evaluateSite(
  siteId: string,
  opts: { db?: Db; now?: Date; enqueue?: boolean } = {},
): Promise<EvaluationReport | null> {
  const db = opts.db ?? getDb();
  const now = opts.now ?? new Date();
  const report = await db.transaction(async (tx) => {
    await tx.execute(
      sql`SELECT pg_advisory_xact_lock(${LOCK_NAMESPACE}::int, hashtext(${siteId}::text))`,
    );
    const [site] = await tx.select().from(sites).where(eq(sites.id, siteId)).limit(1);
    if (!site) return null;
    const out: EvaluationReport = {
      siteId,
      slug: site.slug,
      rulesCreated: 0,
      opened: [],
      updated: 0,
      cleared: 0,
      outboxIds: [],
    };
    out.rulesCreated = await createDefaultRulesIfNone(tx, siteId, null);
    const rules = await tx
      .select()
      .from(alertRules)
      .where(and(eq(alertRules.siteId, siteId), eq(alertRules.enabled, true)));
    if (rules.length === 0) return out;

    const values = await loadSiteNights(tx, siteId);
    const referenceNight = addDays(nightOf(now, site.timeZone), -1);
    const input = {
      values,
      targetMag: site.targetMag,
      stations: rules.some((r) => r.kind === "station_silent")
        ? await stationReports(tx, siteId)
        : [],
      referenceNight,
    };
    let stewards: { id: string; email: string }[] | null = null;

    for (const rule of rules) {
      const params = safeRuleParams(rule.kind, rule.params);
      const outcomes = evaluateCondition(rule.kind, params as never, input);
      for (const o of outcomes) {
        const [existing] = await tx
          .select()
          .from(alerts)
          .where(
            and(
              eq(alerts.ruleId, rule.id),
              eq(alerts.targetKey, o.targetKey),
              inArray(alerts.status, ["open", "acknowledged"]),
            ),
          )
          .limit(1);
        if (o.active === true) {
          const res = await tx.execute<{ id: string; inserted: boolean }>(sql`
            INSERT INTO alerts (rule_id, site_id, station_id, target_key, kind, status, summary, details, last_night, last_seen_at)
            VALUES (${rule.id}::uuid, ${siteId}::uuid, ${o.stationId}::uuid, ${o.targetKey}, ${rule.kind}, 'open', ${o.summary},
                    ${JSON.stringify(o.details)}::jsonb, ${o.night}::date, ${now.toISOString()}::timestamptz)
            ON CONFLICT (rule_id, target_key) WHERE status IN ('open', 'acknowledged')
            DO UPDATE SET last_seen_at = EXCLUDED.last_seen_at, summary = EXCLUDED.summary, details = EXCLUDED.details,
                          last_night = EXCLUDED.last_night, clear_count = 0
            RETURNING id, (xmax = 0) AS inserted`);
          const row = res.rows[0]!;
          if (row.inserted) {
            const [ev] = await tx
              .insert(alertEvents)
              .values({
                alertId: row.id,
                kind: "opened",
                data: { summary: o.summary, details: o.details },
              })
              .returning({ id: alertEvents.id });
            out.opened.push({
              alertId: row.id,
              kind: rule.kind,
              targetKey: o.targetKey,
              summary: o.summary,
            });
            stewards ??= await tx
              .select({ id: users.id, email: users.email })
              .from(siteStewards)
              .innerJoin(users, eq(users.id, siteStewards.userId))
              .where(and(eq(siteStewards.siteId, siteId), eq(users.status, "active")));
            const station = o.stationId ? input.stations.find((s) => s.id === o.stationId) : null;
            for (const st of stewards) {
              const settings = await ensureNotificationSettings(tx, st.id);
              if (!settings.alertsEmail) continue;
              const mail = buildAlertMail({
                appUrl: env().APP_URL,
                token: settings.unsubscribeToken,
                site: { name: site.name, slug: site.slug, targetMag: site.targetMag },
                kind: rule.kind,
                stationName: station?.name ?? null,
                summary: o.summary,
                since: typeof o.details.since === "string" ? o.details.since : null,
                lastNights: values.slice(-10).reverse(),
              });
              const id = await addToOutbox(tx, {
                dedupeKey: `alert-event:${ev!.id}:${st.email.toLowerCase()}`,
                alertEventId: ev!.id,
                alertId: row.id,
                userId: st.id,
                recipient: st.email,
                ...mail,
              });
              if (id) out.outboxIds.push(id);
            }
          } else if (existing && (existing.lastNight !== o.night || existing.clearCount > 0)) {
            await tx
              .insert(alertEvents)
              .values({
                alertId: row.id,
                kind: "updated",
                data: { summary: o.summary, details: o.details },
              });
            out.updated++;
          }
        } else if (o.active === false && existing) {
          const clearCount = existing.clearCount + newNightsSince(o, values, existing.lastNight);
          const clearAfter = (params as { clearAfterNights: number }).clearAfterNights;
          if (clearCount >= clearAfter) {
            await tx
              .update(alerts)
              .set({ status: "resolved", resolvedAt: now, clearCount, lastNight: o.night })
              .where(eq(alerts.id, existing.id));
            await tx
              .insert(alertEvents)
              .values({
                alertId: existing.id,
                kind: "cleared",
                data: { summary: o.summary, clearNights: clearCount },
              });
            out.cleared++;
          } else if (clearCount !== existing.clearCount || o.night !== existing.lastNight) {
            await tx
              .update(alerts)
              .set({ clearCount, lastNight: o.night })
              .where(eq(alerts.id, existing.id));
          }
        }
      }
      await tx.update(alertRules).set({ lastEvaluatedAt: now }).where(eq(alertRules.id, rule.id));
    }
    return out;
  });
  if (report && opts.enqueue !== false) await enqueueOutbox(report.outboxIds);
  return report;
}

/** Evaluates every site (the daily job and `{}` job data), then re-enqueues lost e-mails. */
export async function evaluateAllSites(
  opts: { db?: Db; now?: Date; enqueue?: boolean } = {},
): Promise<EvaluationReport[]> {
  const db = opts.db ?? getDb();
  const list = await db.select({ id: sites.id }).from(sites).orderBy(asc(sites.slug));
  const reports: EvaluationReport[] = [];
  for (const s of list) {
    const r = await evaluateSite(s.id, { ...opts, db });
    if (r) reports.push(r);
  }
  if (opts.enqueue !== false) await sweepOutbox(db);
  return reports;
}
