import PgBoss from "pg-boss";
import { env } from "@/lib/env";

/** Queue names. Every background job goes through pg-boss in the app's own PostgreSQL. */
export const QUEUES = {
  importUpload: "import-upload",
  evaluateAlerts: "evaluate-alerts",
  sendMail: "send-mail",
  renderBrief: "render-brief",
} as const;

const g = globalThis as unknown as { __nmBoss?: Promise<PgBoss> };

/** A sender for web processes: no maintenance or scheduling, just send. */
export function boss(): Promise<PgBoss> {
  g.__nmBoss ??= (async () => {
    const b = new PgBoss({ connectionString: env().DATABASE_URL, supervise: false, schedule: false, max: 3 });
    b.on("error", (err) => console.error("[queue]", err.message));
    await b.start();
    return b;
  })().catch((err) => {
    g.__nmBoss = undefined;
    throw err;
  });
  return g.__nmBoss;
}

export async function enqueue(name: string, data: object, options: PgBoss.SendOptions = {}) {
  const b = await boss();
  return b.send(name, data, { retryLimit: 10, retryDelay: 5, retryBackoff: true, ...options });
}
