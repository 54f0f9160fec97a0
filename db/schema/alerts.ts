import { sql } from "drizzle-orm";
import {
  bigint,
  bigserial,
  boolean,
  date,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from "drizzle-orm/pg-core";
import { users } from "./auth";
import { sites } from "./sites";
import { stations } from "./stations";

export const alertRuleKindEnum = pgEnum("alert_rule_kind", [
  "darkening_vs_baseline",
  "brightening_trend",
  "below_target",
  "station_silent",
  "sudden_step",
]);
export const ALERT_RULE_KINDS = alertRuleKindEnum.enumValues;
export type AlertRuleKind = (typeof ALERT_RULE_KINDS)[number];

export const alertStatusEnum = pgEnum("alert_status", ["open", "acknowledged", "resolved"]);
export const alertEventKindEnum = pgEnum("alert_event_kind", [
  "opened",
  "updated",
  "acknowledged",
  "resolved",
  "cleared",
]);
/** `sending` marks a row a worker has claimed; a claim older than a few minutes is taken over (a crashed worker). */
export const emailStatusEnum = pgEnum("email_status", ["pending", "sending", "sent", "failed"]);

/** A site's alert rules; `params` is validated per kind by lib/alerts/rules.ts (zod). */
export const alertRules = pgTable(
  "alert_rules",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    siteId: uuid("site_id")
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    kind: alertRuleKindEnum("kind").notNull(),
    params: jsonb("params").$type<Record<string, unknown>>().notNull().default({}),
    enabled: boolean("enabled").notNull().default(true),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    updatedBy: uuid("updated_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    lastEvaluatedAt: timestamp("last_evaluated_at", { withTimezone: true }),
  },
  (t) => [index("alert_rules_site_idx").on(t.siteId)],
);

/**
 * One row per episode of a condition. `targetKey` is the station id for per-station rules and
 * "site" otherwise: the partial unique index allows only one open-or-acknowledged alert per
 * (rule, target), which is what makes a re-evaluation update the alert instead of adding one.
 */
export const alerts = pgTable(
  "alerts",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    ruleId: uuid("rule_id")
      .notNull()
      .references(() => alertRules.id, { onDelete: "cascade" }),
    siteId: uuid("site_id")
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    stationId: uuid("station_id").references(() => stations.id, { onDelete: "cascade" }),
    targetKey: text("target_key").notNull(),
    kind: alertRuleKindEnum("kind").notNull(),
    status: alertStatusEnum("status").notNull().default("open"),
    /** One line: what, by how much, since when. */
    summary: text("summary").notNull(),
    details: jsonb("details").$type<Record<string, unknown>>().notNull().default({}),
    openedAt: timestamp("opened_at", { withTimezone: true }).notNull().defaultNow(),
    lastSeenAt: timestamp("last_seen_at", { withTimezone: true }).notNull().defaultNow(),
    /** The latest site night the last evaluation saw (clear counting adds only newer nights). */
    lastNight: date("last_night"),
    /** Consecutive nights without the condition; the alert clears at the rule's clearAfterNights. */
    clearCount: integer("clear_count").notNull().default(0),
    acknowledgedBy: uuid("acknowledged_by").references(() => users.id, { onDelete: "set null" }),
    acknowledgedAt: timestamp("acknowledged_at", { withTimezone: true }),
    resolvedBy: uuid("resolved_by").references(() => users.id, { onDelete: "set null" }),
    resolvedAt: timestamp("resolved_at", { withTimezone: true }),
    note: text("note").notNull().default(""),
  },
  (t) => [
    uniqueIndex("alerts_one_active_idx")
      .on(t.ruleId, t.targetKey)
      .where(sql`status IN ('open', 'acknowledged')`),
    index("alerts_site_status_idx").on(t.siteId, t.status),
  ],
);

export const alertEvents = pgTable(
  "alert_events",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    alertId: uuid("alert_id")
      .notNull()
      .references(() => alerts.id, { onDelete: "cascade" }),
    kind: alertEventKindEnum("kind").notNull(),
    at: timestamp("at", { withTimezone: true }).notNull().defaultNow(),
    actorId: uuid("actor_id").references(() => users.id, { onDelete: "set null" }),
    data: jsonb("data").$type<Record<string, unknown>>().notNull().default({}),
  },
  (t) => [index("alert_events_alert_idx").on(t.alertId)],
);

/**
 * Every e-mail the alerting sends, written in the same transaction as its cause. UNIQUE (event,
 * recipient) means an event is never mailed twice to one person; digests (no event) dedupe on
 * `dedupeKey`. A send job handles one row and skips rows already sent.
 */
export const emailOutbox = pgTable(
  "email_outbox",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    alertEventId: bigint("alert_event_id", { mode: "number" }).references(() => alertEvents.id, {
      onDelete: "cascade",
    }),
    alertId: uuid("alert_id").references(() => alerts.id, { onDelete: "cascade" }),
    dedupeKey: text("dedupe_key").notNull().unique(),
    userId: uuid("user_id").references(() => users.id, { onDelete: "set null" }),
    recipient: text("recipient").notNull(),
    subject: text("subject").notNull(),
    text: text("text").notNull(),
    html: text("html").notNull(),
    headers: jsonb("headers").$type<Record<string, string>>().notNull().default({}),
    status: emailStatusEnum("status").notNull().default("pending"),
    attempts: integer("attempts").notNull().default(0),
    lastError: text("last_error"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    claimedAt: timestamp("claimed_at", { withTimezone: true }),
    sentAt: timestamp("sent_at", { withTimezone: true }),
  },
  (t) => [
    uniqueIndex("email_outbox_event_recipient_idx").on(t.alertEventId, t.recipient),
    index("email_outbox_status_idx").on(t.status),
    index("email_outbox_alert_idx").on(t.alertId),
  ],
);

/** Per person: alert e-mails on/off, weekly digest opt-in, and the token of the unsubscribe link. */
export const notificationSettings = pgTable("notification_settings", {
  userId: uuid("user_id")
    .primaryKey()
    .references(() => users.id, { onDelete: "cascade" }),
  alertsEmail: boolean("alerts_email").notNull().default(true),
  weeklyDigest: boolean("weekly_digest").notNull().default(false),
  /** 256-bit random, base64url. Kept in clear because every e-mail must carry it; it can only change these settings. */
  unsubscribeToken: text("unsubscribe_token").notNull().unique(),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
});
