import { randomBytes } from "node:crypto";
import { eq } from "drizzle-orm";
import { getDb } from "@/db";
import { stations, users } from "@/db/schema";
import { issueToken } from "@/lib/stations/tokens";

/** A fresh station (unique slug) owned by the demo volunteer, with a token. For tests only. */
export async function makeStation(opts: { lat?: number; lon?: number; timeZone?: string; status?: "active" | "retired" } = {}) {
  const db = getDb();
  const [owner] = await db.select().from(users).where(eq(users.email, "volunteer@demo.nightmark.example")).limit(1);
  if (!owner) throw new Error("demo volunteer missing: is the test database seeded?");
  const slug = `test-${randomBytes(5).toString("hex")}`;
  const [st] = await db
    .insert(stations)
    .values({
      slug,
      name: `Test station ${slug}`,
      ownerId: owner.id,
      lat: opts.lat ?? 37.9,
      lon: opts.lon ?? -111.4,
      timeZone: opts.timeZone ?? "America/Denver",
      status: opts.status ?? "active",
    })
    .returning();
  const token = await issueToken(db, st!.id, "test", null);
  return { station: st!, token: token.token, tokenId: token.id };
}
