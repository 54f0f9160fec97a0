import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import pg from "pg";
import { env } from "@/lib/env";
import * as schema from "./schema";

export type Db = NodePgDatabase<typeof schema>;

// One pool per process; cached on globalThis so dev-server reloads do not open new pools.
const g = globalThis as unknown as { __nightmarkPool?: pg.Pool; __nightmarkDb?: Db };

export function pool(): pg.Pool {
  if (!g.__nightmarkPool) {
    g.__nightmarkPool = new pg.Pool({
      connectionString: env().DATABASE_URL,
      max: Number(process.env.PG_POOL_MAX ?? 10),
      connectionTimeoutMillis: 5_000,
      idleTimeoutMillis: 30_000,
    });
    // A dropped connection (database restart) must not crash the process.
    g.__nightmarkPool.on("error", () => {});
    // A client that is checked out (a transaction, an upload chunk) when the server goes away emits
    // 'error' on itself; without a listener that crashes the process. The query in flight rejects
    // and the pool drops the broken client, so a no-op listener is enough.
    g.__nightmarkPool.on("connect", (client) => client.on("error", () => {}));
  }
  return g.__nightmarkPool;
}

export function getDb(): Db {
  if (!g.__nightmarkDb) g.__nightmarkDb = drizzle(pool(), { schema });
  return g.__nightmarkDb;
}

export { schema };
