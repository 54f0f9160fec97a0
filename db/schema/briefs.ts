import { customType, index, integer, jsonb, pgEnum, pgTable, text, timestamp, uuid, date } from "drizzle-orm/pg-core";
import { users } from "./auth";

/** PostgreSQL bytea as a Node Buffer (the rendered PDF lives in the database: one store, backed up with it). */
const bytea = customType<{ data: Buffer; driverData: Buffer }>({ dataType: () => "bytea" });

export const briefStatusEnum = pgEnum("brief_status", ["queued", "rendering", "done", "failed"]);

export type BriefParams = {
  /** Saved glow estimates (glow_estimates.id) attached as a "what-if" section. */
  glowEstimateIds: string[];
};

/** What the public verification page may show about a brief (no personal data). */
export type BriefVerification = {
  sites: { slug: string; name: string }[];
  from: string;
  to: string;
  generatedAt: string;
  softwareVersion: string;
  /** Hex SHA-256 of the canonical JSON of the data behind the brief (lib/briefs/verification.ts). */
  dataSha256: string;
  nightRows: number;
  stations: number;
};

/** A hearing brief: a PDF of a site's record for a period, rendered by the worker (ingest/jobs/render-brief.ts). */
export const hearingBriefs = pgTable(
  "hearing_briefs",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    createdBy: uuid("created_by")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    siteIds: uuid("site_ids").array().notNull(),
    periodFrom: date("period_from").notNull(),
    periodTo: date("period_to").notNull(),
    params: jsonb("params").$type<BriefParams>().notNull().default({ glowEstimateIds: [] }),
    status: briefStatusEnum("status").notNull().default("queued"),
    /** 0–100, for the progress bar. */
    progress: integer("progress").notNull().default(0),
    error: text("error"),
    attempts: integer("attempts").notNull().default(0),
    pdf: bytea("pdf"),
    sizeBytes: integer("size_bytes"),
    /** Hex SHA-256 of the PDF bytes. */
    sha256: text("sha256"),
    /** 10 base32 characters of the SHA-256 of the canonical data JSON; the same data gives the same code. */
    verificationCode: text("verification_code"),
    verification: jsonb("verification").$type<BriefVerification>(),
    renderMs: integer("render_ms"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp("started_at", { withTimezone: true }),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
  },
  (t) => [index("hearing_briefs_created_by_idx").on(t.createdBy), index("hearing_briefs_code_idx").on(t.verificationCode)],
);

/** Share links for a brief: the token is shown once and stored as its SHA-256. */
export const briefShares = pgTable(
  "brief_shares",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    briefId: uuid("brief_id")
      .notNull()
      .references(() => hearingBriefs.id, { onDelete: "cascade" }),
    tokenHash: text("token_hash").notNull().unique(),
    createdBy: uuid("created_by")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
  },
  (t) => [index("brief_shares_brief_idx").on(t.briefId)],
);

export type GlowProposed = { lat: number; lon: number; population?: number; lumens?: number };
/** A known existing light source: a position (distance to each site computed) or a distance from one site. */
export type GlowExistingSource = { name: string; population: number; lat?: number; lon?: number; siteSlug?: string; distanceKm?: number };
export type GlowSiteResult = {
  siteSlug: string;
  siteName: string;
  distanceKm: number;
  measuredMag: number | null;
  measuredNights: number;
  ok: boolean;
  reason: string | null;
  deltaMag: number | null;
  percentBrighter: number | null;
  newMag: number | null;
  withinValidity: boolean;
  warnings: string[];
  sources: { name: string; population: number; distanceKm: number }[];
};

/** A saved "what-if": Walker's-law estimate of a proposed development's added glow at nearby sites. */
export const glowEstimates = pgTable(
  "glow_estimates",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    createdBy: uuid("created_by")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    proposed: jsonb("proposed").$type<GlowProposed>().notNull(),
    existingSources: jsonb("existing_sources").$type<GlowExistingSource[]>().notNull().default([]),
    results: jsonb("results").$type<GlowSiteResult[]>().notNull().default([]),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("glow_estimates_created_by_idx").on(t.createdBy)],
);
