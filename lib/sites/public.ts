import { asc, eq } from "drizzle-orm";
import { getDb } from "@/db";
import { sites } from "@/db/schema";

/** Sites whose stewards made them public: the only site data a signed-out visitor may read. */
export async function listPublicSites() {
  return getDb()
    .select({ slug: sites.slug, name: sites.name, description: sites.description })
    .from(sites)
    .where(eq(sites.isPublic, true))
    .orderBy(asc(sites.name));
}
