import { boolean, pgEnum, pgTable, primaryKey, real, text, timestamp, uuid, jsonb } from "drizzle-orm/pg-core";
import type { MultiPolygon, Polygon } from "geojson";
import { users } from "./auth";

/** CIE 150:2017 environmental zones. */
export const lightingZoneEnum = pgEnum("lighting_zone", ["E0", "E1", "E2", "E3", "E4"]);

export const sites = pgTable("sites", {
  id: uuid("id").primaryKey().defaultRandom(),
  slug: text("slug").notNull().unique(),
  name: text("name").notNull(),
  description: text("description").notNull().default(""),
  boundary: jsonb("boundary").$type<Polygon | MultiPolygon>().notNull(),
  timeZone: text("time_zone").notNull(),
  targetMag: real("target_mag").notNull().default(21.5),
  naturalSkyMag: real("natural_sky_mag").notNull().default(22.0),
  isPublic: boolean("is_public").notNull().default(false),
  roundPublicPositions: boolean("round_public_positions").notNull().default(true),
  lightingZone: lightingZoneEnum("lighting_zone"),
  // Screening thresholds (defaults: astronomical night, moon below the horizon).
  sunMaxAltDeg: real("sun_max_alt_deg").notNull().default(-18),
  moonMaxAltDeg: real("moon_max_alt_deg").notNull().default(0),
  cloudWindowMin: real("cloud_window_min").notNull().default(15),
  cloudSpreadMag: real("cloud_spread_mag").notNull().default(0.25),
  createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
});

export const siteStewards = pgTable(
  "site_stewards",
  {
    siteId: uuid("site_id")
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.siteId, t.userId] })],
);
