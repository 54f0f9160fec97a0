import {
  bigint,
  date,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  real,
  smallint,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from "drizzle-orm/pg-core";
import { users } from "./auth";
import { stations } from "./stations";

export const readingSourceEnum = pgEnum("reading_source", ["post", "upload", "survey", "seed"]);

/**
 * One row per station per instant. The primary key (station_id, taken_at) makes every ingest path
 * idempotent. The table is range-partitioned by taken_at (see the first migration) and keeps
 * station_id on every row so that a distributed PostgreSQL can shard on it.
 * Screening inputs (sun/moon altitude, moon fraction) are stored so thresholds can change later.
 * `flags` is a bitmask, see lib/flags.ts.
 */
export const readings = pgTable(
  "readings",
  {
    stationId: uuid("station_id").notNull(),
    takenAt: timestamp("taken_at", { withTimezone: true, mode: "date" }).notNull(),
    mag: real("mag").notNull(),
    tempC: real("temp_c"),
    sunAltDeg: real("sun_alt_deg").notNull(),
    moonAltDeg: real("moon_alt_deg").notNull(),
    moonFraction: real("moon_fraction").notNull(),
    flags: smallint("flags").notNull().default(0),
    source: readingSourceEnum("source").notNull(),
    uploadId: uuid("upload_id"),
  },
  (t) => [primaryKey({ columns: [t.stationId, t.takenAt] })],
);

/** Per station per local night (named by its evening date in the station's time zone). */
export const nightSummaries = pgTable(
  "night_summaries",
  {
    stationId: uuid("station_id")
      .notNull()
      .references(() => stations.id, { onDelete: "cascade" }),
    night: date("night").notNull(),
    readings: integer("readings").notNull(),
    usableReadings: integer("usable_readings").notNull(),
    medianMag: real("median_mag"),
    darkestSustainedMag: real("darkest_sustained_mag"),
    spreadMag: real("spread_mag"),
    usableHours: real("usable_hours").notNull().default(0),
    calibrationOffsetMag: real("calibration_offset_mag").notNull().default(0),
    flagCounts: jsonb("flag_counts").$type<Record<string, number>>().notNull().default({}),
    firstAt: timestamp("first_at", { withTimezone: true }),
    lastAt: timestamp("last_at", { withTimezone: true }),
    computedAt: timestamp("computed_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.stationId, t.night] }), index("night_summaries_night_idx").on(t.night)],
);

/** Nights touched by new readings, waiting for the worker to summarise them. */
export const dirtyNights = pgTable(
  "dirty_nights",
  {
    stationId: uuid("station_id").notNull(),
    night: date("night").notNull(),
    markedAt: timestamp("marked_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.stationId, t.night] })],
);

export const uploadStatusEnum = pgEnum("upload_status", [
  "stored",
  "queued",
  "importing",
  "done",
  "failed",
]);

export type UploadMapping = {
  delimiter: "," | ";" | "\t";
  timeColumn: string;
  /** "UTC" or an IANA zone for a local-time column. */
  timeZone: string;
  magColumn: string;
  tempColumn?: string | null;
};

export const uploads = pgTable(
  "uploads",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    stationId: uuid("station_id")
      .notNull()
      .references(() => stations.id, { onDelete: "cascade" }),
    uploadedBy: uuid("uploaded_by").references(() => users.id),
    filename: text("filename").notNull(),
    sizeBytes: bigint("size_bytes", { mode: "number" }).notNull(),
    sha256: text("sha256").notNull(),
    objectKey: text("object_key").notNull(),
    status: uploadStatusEnum("status").notNull().default("stored"),
    mapping: jsonb("mapping").$type<UploadMapping>(),
    metadata: jsonb("metadata").$type<Record<string, string>>().notNull().default({}),
    rowsRead: integer("rows_read").notNull().default(0),
    accepted: integer("accepted").notNull().default(0),
    duplicates: integer("duplicates").notNull().default(0),
    rejectedCount: integer("rejected_count").notNull().default(0),
    /** The first 1,000 rejected lines: { line, reason }. */
    rejections: jsonb("rejections").$type<{ line: number; reason: string }[]>().notNull().default([]),
    bytesProcessed: bigint("bytes_processed", { mode: "number" }).notNull().default(0),
    error: text("error"),
    attempts: integer("attempts").notNull().default(0),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp("started_at", { withTimezone: true }),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
  },
  (t) => [uniqueIndex("uploads_station_sha_idx").on(t.stationId, t.sha256)],
);

export const surveys = pgTable("surveys", {
  id: uuid("id").primaryKey().defaultRandom(),
  userId: uuid("user_id")
    .notNull()
    .references(() => users.id),
  title: text("title").notNull(),
  notes: text("notes").notNull().default(""),
  createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
});

export const surveyPoints = pgTable(
  "survey_points",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    surveyId: uuid("survey_id")
      .notNull()
      .references(() => surveys.id, { onDelete: "cascade" }),
    lat: doublePrecision("lat").notNull(),
    lon: doublePrecision("lon").notNull(),
    takenAt: timestamp("taken_at", { withTimezone: true }).notNull(),
    values: real("values").array().notNull(),
    medianMag: real("median_mag").notNull(),
    spreadMag: real("spread_mag").notNull(),
    sunAltDeg: real("sun_alt_deg").notNull(),
    moonAltDeg: real("moon_alt_deg").notNull(),
    moonFraction: real("moon_fraction").notNull(),
    flags: smallint("flags").notNull().default(0),
    conditions: text("conditions").notNull().default(""),
    notes: text("notes").notNull().default(""),
  },
  (t) => [index("survey_points_survey_idx").on(t.surveyId)],
);
