/**
 * Service verbs behind /alerts, /alerts/rules and /settings/notifications. Each does its own
 * authorisation: stewards act on the sites they keep, admins on all; an alert, rule or site the
 * caller may not act on answers 404.
 */
import { and, asc, desc, eq, inArray, sql } from "drizzle-orm";
import { z } from "zod";
import {
  alertEvents,
  alertRules,
  alerts,
  emailOutbox,
  notificationSettings,
  siteStewards,
  sites,
  stations,
  users,
  ALERT_RULE_KINDS,
  type AlertRuleKind,
} from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import { isSiteSteward, requireRole, requireUser, type Ctx } from "@/lib/auth/guard";
import { conflict, notFound } from "@/lib/errors";
import { ensureNotificationSettings } from "./outbox";
import { DEFAULT_RULE_PARAMS, RULE_KIND_ORDER, RULE_PARAM_SCHEMAS, safeRuleParams } from "./rules";

type Input<T> = { ctx: Ctx; input: T };

/** Site ids the caller keeps (null = every site, for admins). */
async function keptSiteIds(ctx: Ctx): Promise<string[] | null> {
  const user = requireRole(ctx, "steward");
  if (user.role === "admin") return null;
  const rows = await ctx.db
    .select({ id: siteStewards.siteId })
    .from(siteStewards)
    .where(eq(siteStewards.userId, user.id));
  return rows.map((r) => r.id);
}

export async function listKeptSites({ ctx }: { ctx: Ctx }) {
  const ids = await keptSiteIds(ctx);
  if (ids && ids.length === 0) return [];
  return ctx.db
    .select({ id: sites.id, slug: sites.slug, name: sites.name })
    .from(sites)
    .where(ids ? inArray(sites.id, ids) : sql`TRUE`)
    .orderBy(asc(sites.name));
}

// ---------------------------------------------------------------------------------------------
// Alerts
// ---------------------------------------------------------------------------------------------

export const alertListSchema = z.object({
  status: z.enum(["open", "acknowledged", "resolved"]).default("open"),
  site: z.string().max(200).optional(),
  kind: z.enum(ALERT_RULE_KINDS).optional(),
});

export type AlertListItem = {
  id: string;
  kind: AlertRuleKind;
  status: "open" | "acknowledged" | "resolved";
  summary: string;
  details: Record<string, unknown>;
  site: { slug: string; name: string };
  stationName: string | null;
  openedAt: Date;
  lastSeenAt: Date;
  clearCount: number;
  acknowledgedAt: Date | null;
  acknowledgedByName: string | null;
  resolvedAt: Date | null;
  resolvedByName: string | null;
  note: string;
  mail: {
    recipient: string;
    status: string;
    attempts: number;
    lastError: string | null;
    sentAt: Date | null;
  }[];
};

export async function listAlerts({
  ctx,
  input,
}: Input<z.input<typeof alertListSchema>>): Promise<AlertListItem[]> {
  const ids = await keptSiteIds(ctx);
  const q = alertListSchema.parse(input);
  if (ids && ids.length === 0) return [];
  const ackUser = sql<
    string | null
  >`(SELECT coalesce(u.name, u.email) FROM users u WHERE u.id = ${alerts.acknowledgedBy})`;
  const resUser = sql<
    string | null
  >`(SELECT coalesce(u.name, u.email) FROM users u WHERE u.id = ${alerts.resolvedBy})`;
  const rows = await ctx.db
    .select({
      a: alerts,
      siteSlug: sites.slug,
      siteName: sites.name,
      stationName: stations.name,
      ackName: ackUser,
      resName: resUser,
    })
    .from(alerts)
    .innerJoin(sites, eq(sites.id, alerts.siteId))
    .leftJoin(stations, eq(stations.id, alerts.stationId))
    .where(
      and(
        eq(alerts.status, q.status),
        ids ? inArray(alerts.siteId, ids) : undefined,
        q.site ? eq(sites.slug, q.site) : undefined,
        q.kind ? eq(alerts.kind, q.kind) : undefined,
      ),
    )
    .orderBy(desc(q.status === "resolved" ? alerts.resolvedAt : alerts.openedAt))
    .limit(200);
  const alertIds = rows.map((r) => r.a.id);
  const mail = alertIds.length
    ? await ctx.db
        .select({
          alertId: emailOutbox.alertId,
          recipient: emailOutbox.recipient,
          status: emailOutbox.status,
          attempts: emailOutbox.attempts,
          lastError: emailOutbox.lastError,
          sentAt: emailOutbox.sentAt,
        })
        .from(emailOutbox)
        .where(inArray(emailOutbox.alertId, alertIds))
        .orderBy(asc(emailOutbox.createdAt))
    : [];
  return rows.map((r) => ({
    id: r.a.id,
    kind: r.a.kind,
    status: r.a.status,
    summary: r.a.summary,
    details: r.a.details,
    site: { slug: r.siteSlug, name: r.siteName },
    stationName: r.stationName,
    openedAt: r.a.openedAt,
    lastSeenAt: r.a.lastSeenAt,
    clearCount: r.a.clearCount,
    acknowledgedAt: r.a.acknowledgedAt,
    acknowledgedByName: r.ackName,
    resolvedAt: r.a.resolvedAt,
    resolvedByName: r.resName,
    note: r.a.note,
    mail: mail.filter((m) => m.alertId === r.a.id).map(({ alertId: _a, ...m }) => m),
  }));
}

export const alertDecisionSchema = z.object({
  alertId: z.string().uuid("Unknown alert."),
  note: z.string().trim().max(2000, "At most 2,000 characters.").default(""),
});

async function findAlertForSteward(ctx: Ctx, alertId: string) {
  const [a] = await ctx.db.select().from(alerts).where(eq(alerts.id, alertId)).limit(1);
  if (!a || !(await isSiteSteward(ctx, a.siteId))) throw notFound("The alert");
  return a;
}

/** open → acknowledged, with who, when and a note. */
export async function acknowledgeAlert({ ctx, input }: Input<z.input<typeof alertDecisionSchema>>) {
  const user = requireRole(ctx, "steward");
  const { alertId, note } = alertDecisionSchema.parse(input);
  const a = await findAlertForSteward(ctx, alertId);
  return ctx.db.transaction(async (tx) => {
    const [row] = await tx
      .update(alerts)
      .set({
        status: "acknowledged",
        acknowledgedBy: user.id,
        acknowledgedAt: new Date(),
        note: note || a.note,
      })
      .where(and(eq(alerts.id, a.id), eq(alerts.status, "open")))
      .returning();
    if (!row) throw conflict(`This alert is already ${a.status}.`);
    await tx
      .insert(alertEvents)
      .values({ alertId: a.id, kind: "acknowledged", actorId: user.id, data: { note } });
    return row;
  });
}

/** open or acknowledged → resolved. A condition that still holds opens a new alert at the next evaluation. */
export async function resolveAlert({ ctx, input }: Input<z.input<typeof alertDecisionSchema>>) {
  const user = requireRole(ctx, "steward");
  const { alertId, note } = alertDecisionSchema.parse(input);
  const a = await findAlertForSteward(ctx, alertId);
  return ctx.db.transaction(async (tx) => {
    const [row] = await tx
      .update(alerts)
      .set({
        status: "resolved",
        resolvedBy: user.id,
        resolvedAt: new Date(),
        note: note || a.note,
      })
      .where(and(eq(alerts.id, a.id), inArray(alerts.status, ["open", "acknowledged"])))
      .returning();
    if (!row) throw conflict("This alert is already resolved.");
    await tx
      .insert(alertEvents)
      .values({ alertId: a.id, kind: "resolved", actorId: user.id, data: { note } });
    return row;
  });
}

// ---------------------------------------------------------------------------------------------
// Rules
// ---------------------------------------------------------------------------------------------

async function siteForSteward(ctx: Ctx, slug: string) {
  requireRole(ctx, "steward");
  const [site] = await ctx.db.select().from(sites).where(eq(sites.slug, slug)).limit(1);
  if (!site || !(await isSiteSteward(ctx, site.id))) throw notFound("The site");
  return site;
}

export async function listRules({ ctx, input }: Input<{ slug: string }>) {
  const site = await siteForSteward(ctx, input.slug);
  const rows = await ctx.db
    .select({
      r: alertRules,
      updatedByName: sql<
        string | null
      >`(SELECT coalesce(u.name, u.email) FROM users u WHERE u.id = ${alertRules.updatedBy})`,
    })
    .from(alertRules)
    .where(eq(alertRules.siteId, site.id));
  const order = (k: AlertRuleKind) => RULE_KIND_ORDER.indexOf(k);
  return {
    site: { id: site.id, slug: site.slug, name: site.name, targetMag: site.targetMag },
    rules: rows
      .sort((a, b) => order(a.r.kind) - order(b.r.kind))
      .map(({ r, updatedByName }) => ({
        id: r.id,
        kind: r.kind,
        enabled: r.enabled,
        params: safeRuleParams(r.kind, r.params),
        updatedAt: r.updatedAt,
        updatedByName,
        lastEvaluatedAt: r.lastEvaluatedAt,
      })),
  };
}

/** Adds a default rule for every kind the site does not have yet. */
export async function createDefaultRules({ ctx, input }: Input<{ slug: string }>) {
  const user = requireRole(ctx, "steward");
  const site = await siteForSteward(
    ctx,
    z.object({ slug: z.string().min(1).max(200) }).parse(input).slug,
  );
  return ctx.db.transaction(async (tx) => {
    const have = new Set(
      (
        await tx
          .select({ kind: alertRules.kind })
          .from(alertRules)
          .where(eq(alertRules.siteId, site.id))
      ).map((r) => r.kind),
    );
    const created: string[] = [];
    for (const kind of RULE_KIND_ORDER) {
      if (have.has(kind)) continue;
      const [r] = await tx
        .insert(alertRules)
        .values({
          siteId: site.id,
          kind,
          params: DEFAULT_RULE_PARAMS[kind] as Record<string, unknown>,
          createdBy: user.id,
          updatedBy: user.id,
        })
        .returning();
      await recordAudit(tx, {
        actorId: user.id,
        action: "alert_rule.create",
        entityType: "alert_rule",
        entityId: r!.id,
        after: { site: site.slug, kind, params: r!.params, enabled: r!.enabled },
      });
      created.push(kind);
    }
    return created;
  });
}

export const ruleUpdateSchema = z.object({
  ruleId: z.string().uuid("Unknown rule."),
  enabled: z.boolean(),
  params: z.record(z.string(), z.unknown()),
});

/** Validates the params against the rule's kind (zod, field paths kept for the form) and records the change. */
export async function updateRule({ ctx, input }: Input<z.input<typeof ruleUpdateSchema>>) {
  const user = requireRole(ctx, "steward");
  const { ruleId, enabled, params } = ruleUpdateSchema.parse(input);
  const [rule] = await ctx.db.select().from(alertRules).where(eq(alertRules.id, ruleId)).limit(1);
  if (!rule || !(await isSiteSteward(ctx, rule.siteId))) throw notFound("The rule");
  const parsed = RULE_PARAM_SCHEMAS[rule.kind].parse(params) as Record<string, unknown>;
  return ctx.db.transaction(async (tx) => {
    const [row] = await tx
      .update(alertRules)
      .set({ enabled, params: parsed, updatedBy: user.id, updatedAt: new Date() })
      .where(eq(alertRules.id, rule.id))
      .returning();
    await recordAudit(tx, {
      actorId: user.id,
      action: "alert_rule.update",
      entityType: "alert_rule",
      entityId: rule.id,
      before: { kind: rule.kind, enabled: rule.enabled, params: rule.params },
      after: { kind: rule.kind, enabled, params: parsed },
    });
    return row!;
  });
}

// ---------------------------------------------------------------------------------------------
// Notification settings
// ---------------------------------------------------------------------------------------------

export const notificationUpdateSchema = z.object({
  alertsEmail: z.boolean(),
  weeklyDigest: z.boolean(),
});

export async function getMyNotificationSettings({ ctx }: { ctx: Ctx }) {
  const user = requireUser(ctx);
  const s = await ensureNotificationSettings(ctx.db, user.id);
  return { alertsEmail: s.alertsEmail, weeklyDigest: s.weeklyDigest, email: user.email };
}

export async function updateMyNotificationSettings({
  ctx,
  input,
}: Input<z.input<typeof notificationUpdateSchema>>) {
  const user = requireUser(ctx);
  const v = notificationUpdateSchema.parse(input);
  await ensureNotificationSettings(ctx.db, user.id);
  await ctx.db
    .update(notificationSettings)
    .set({ ...v, updatedAt: new Date() })
    .where(eq(notificationSettings.userId, user.id));
  return v;
}

const tokenSchema = z
  .string()
  .min(20, "This link is not valid.")
  .max(100, "This link is not valid.");

/** Settings by the link in an e-mail (no sign-in): the token is the authorisation. */
export async function getSettingsByToken({ ctx, input }: Input<{ token: string }>) {
  const token = tokenSchema.parse(input.token);
  const [row] = await ctx.db
    .select({
      alertsEmail: notificationSettings.alertsEmail,
      weeklyDigest: notificationSettings.weeklyDigest,
      email: users.email,
    })
    .from(notificationSettings)
    .innerJoin(users, eq(users.id, notificationSettings.userId))
    .where(eq(notificationSettings.unsubscribeToken, token))
    .limit(1);
  if (!row) throw notFound("This link");
  return row;
}

export const tokenUpdateSchema = notificationUpdateSchema.partial().extend({ token: tokenSchema });

export async function updateSettingsByToken({
  ctx,
  input,
}: Input<z.input<typeof tokenUpdateSchema>>) {
  const { token, ...v } = tokenUpdateSchema.parse(input);
  const [row] = await ctx.db
    .update(notificationSettings)
    .set({ ...v, updatedAt: new Date() })
    .where(eq(notificationSettings.unsubscribeToken, token))
    .returning({
      alertsEmail: notificationSettings.alertsEmail,
      weeklyDigest: notificationSettings.weeklyDigest,
    });
  if (!row) throw notFound("This link");
  return row;
}
