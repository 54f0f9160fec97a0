/**
 * npm run station:token -- <station-slug> [token name]
 *
 * Creates a station token (lib/stations/tokens.ts issueToken: stored hashed, audited) and prints it
 * alone on the last line, so a script can take it with `tail -n 1`. The token is shown this once.
 * Env: DATABASE_URL (lib/env.ts). Unknown slug → exit 1 with a message on stderr.
 */
import { eq } from "drizzle-orm";
import { getDb, pool } from "@/db";
import { stations } from "@/db/schema";
import { issueToken } from "@/lib/stations/tokens";

async function main(): Promise<number> {
  const [slug, ...nameParts] = process.argv.slice(2).filter((a) => a !== "--");
  if (!slug) {
    console.error("Usage: npm run station:token -- <station-slug> [token name]");
    return 1;
  }
  const db = getDb();
  const [st] = await db.select({ id: stations.id, slug: stations.slug, name: stations.name, status: stations.status }).from(stations).where(eq(stations.slug, slug)).limit(1);
  if (!st) {
    console.error(`No station with the slug "${slug}". Station slugs are on each station's page (/stations/<slug>).`);
    return 1;
  }
  if (st.status === "retired") {
    console.error(`Station "${slug}" (${st.name}) is retired; it cannot get new tokens.`);
    return 1;
  }
  const name = nameParts.join(" ").trim() || `Command line, ${new Date().toISOString().slice(0, 10)}`;
  const t = await issueToken(db, st.id, name, null);
  console.log(`Station: ${st.name} (${st.slug})`);
  console.log(`Token "${t.name}" created, prefix ${t.prefix}. It is shown once, now; only its hash is stored.`);
  console.log(t.token);
  return 0;
}

main()
  .then(async (code) => {
    await pool().end();
    process.exit(code);
  })
  .catch(async (err) => {
    console.error("station:token failed:", err instanceof Error ? err.message : err);
    await pool().end().catch(() => {});
    process.exit(1);
  });
