/**
 * The background worker: summarises nights that new readings touched, and runs every queued job
 * (ingest/jobs). Stateless: run as many as you like; pg-boss and SKIP LOCKED share the work.
 */
import PgBoss from "pg-boss";
import { pool } from "@/db";
import { env } from "@/lib/env";
import { JOBS } from "./jobs";
import { resumeOrphanedImports } from "./jobs/import-upload";
import { QUEUES } from "./queue";
import { summariseDirtyNights } from "./summaries";

const POLL_MS = Number(process.env.SUMMARY_POLL_MS ?? 1000);
let stopping = false;

async function summariseLoop(b: PgBoss) {
  while (!stopping) {
    try {
      const { nights, siteIds } = await summariseDirtyNights(100);
      if (siteIds.length > 0) {
        for (const siteId of siteIds)
          // One pending evaluation per site: a burst of summaries asks for it once.
          await b.send(QUEUES.evaluateAlerts, { siteId }, { singletonKey: siteId, retryLimit: 5, retryDelay: 10 }).catch(() => null);
      }
      if (nights === 100) continue;
    } catch (err) {
      console.error("[worker] summarising failed; retrying shortly:", (err as Error).message);
    }
    await new Promise((r) => setTimeout(r, POLL_MS));
  }
}

async function main() {
  const b = new PgBoss({ connectionString: env().DATABASE_URL, max: 4 });
  b.on("error", (err) => console.error("[worker] queue error:", err.message));
  await b.start();
  for (const q of Object.values(QUEUES)) await b.createQueue(q, { name: q, retryLimit: 10, retryDelay: 5, retryBackoff: true }).catch(() => {});
  for (const job of JOBS) {
    await b.createQueue(job.name, { name: job.name, retryLimit: 10, retryDelay: 5, retryBackoff: true, ...job.queue }).catch(() => {});
    await b.work(job.name, { batchSize: 1 }, async ([j]) => {
      if (j) await job.handler(j.data as never, j as never);
    });
    if (job.cron) await b.schedule(job.name, job.cron, {});
  }
  console.log(`[worker] started: summaries every ${POLL_MS} ms; jobs: ${JOBS.map((j) => j.name).join(", ") || "(none)"}`);
  const loop = summariseLoop(b);
  // Imports whose worker died are picked up again: at start, then every 15 s.
  const sweep = async () => {
    try {
      const resumed = await resumeOrphanedImports();
      if (resumed.length) console.log(`[worker] resumed ${resumed.length} interrupted import(s): ${resumed.join(", ")}`);
    } catch (err) {
      console.error("[worker] could not check for interrupted imports:", (err as Error).message);
    }
  };
  await sweep();
  const sweeper = setInterval(() => void sweep(), Number(process.env.IMPORT_SWEEP_MS ?? 15_000));
  const shutdown = async () => {
    if (stopping) return;
    stopping = true;
    clearInterval(sweeper);
    await loop.catch(() => {});
    await b.stop({ graceful: true, timeout: 10_000 }).catch(() => {});
    await pool().end().catch(() => {});
    process.exit(0);
  };
  process.on("SIGTERM", shutdown);
  process.on("SIGINT", shutdown);
}

main().catch((err) => {
  console.error("[worker] could not start:", err);
  process.exit(1);
});
