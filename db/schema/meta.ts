import { jsonb, pgTable, text, timestamp } from "drizzle-orm/pg-core";

/** Small key/value facts about this database, e.g. which parts of the demo scenario are loaded. */
export const appMeta = pgTable("app_meta", {
  key: text("key").primaryKey(),
  value: jsonb("value").notNull(),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
});
