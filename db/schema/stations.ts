import { doublePrecision, index, pgEnum, pgTable, real, text, timestamp, uuid, date, uniqueIndex } from "drizzle-orm/pg-core";
import { users } from "./auth";
import { sites } from "./sites";

export const stationStatusEnum = pgEnum("station_status", ["active", "retired"]);
/** A station inside a site's boundary counts toward the site only once a steward approves it. */
export const stationApprovalEnum = pgEnum("station_approval", ["none", "pending", "approved", "declined"]);

export const stations = pgTable(
  "stations",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    slug: text("slug").notNull().unique(),
    name: text("name").notNull(),
    siteId: uuid("site_id").references(() => sites.id, { onDelete: "set null" }),
    ownerId: uuid("owner_id")
      .notNull()
      .references(() => users.id),
    lat: doublePrecision("lat").notNull(),
    lon: doublePrecision("lon").notNull(),
    elevationM: real("elevation_m"),
    timeZone: text("time_zone").notNull(),
    status: stationStatusEnum("status").notNull().default("active"),
    approval: stationApprovalEnum("approval").notNull().default("none"),
    deviceDescription: text("device_description").notNull().default(""),
    fieldOfViewDeg: real("field_of_view_deg"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    retiredAt: timestamp("retired_at", { withTimezone: true }),
  },
  (t) => [index("stations_site_idx").on(t.siteId), index("stations_owner_idx").on(t.ownerId)],
);

/** Calibration offsets with effective dates; added to raw values when summarising, never written into readings. */
export const calibrations = pgTable(
  "calibrations",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    stationId: uuid("station_id")
      .notNull()
      .references(() => stations.id, { onDelete: "cascade" }),
    effectiveFrom: date("effective_from").notNull(),
    offsetMag: real("offset_mag").notNull(),
    note: text("note").notNull().default(""),
    createdBy: uuid("created_by").references(() => users.id),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("calibrations_station_from_idx").on(t.stationId, t.effectiveFrom)],
);

export const stationTokens = pgTable(
  "station_tokens",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    stationId: uuid("station_id")
      .notNull()
      .references(() => stations.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    /** First characters of the token, shown in lists so a person can tell tokens apart. */
    prefix: text("prefix").notNull(),
    /** SHA-256 of the whole token (tokens are 256-bit random, so a fast hash is enough). */
    tokenHash: text("token_hash").notNull().unique(),
    createdBy: uuid("created_by").references(() => users.id),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    lastUsedAt: timestamp("last_used_at", { withTimezone: true }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
  },
  (t) => [index("station_tokens_station_idx").on(t.stationId)],
);
