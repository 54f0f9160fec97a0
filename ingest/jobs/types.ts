import type PgBoss from "pg-boss";

export type JobDefinition<T extends object = object> = {
  name: string;
  /** Queue options: retries with backoff by default, so a failed job is retried, never lost. */
  queue?: Omit<PgBoss.Queue, "name">;
  /** A cron schedule (UTC), for jobs that also run on a timetable. */
  cron?: string;
  handler: (data: T, job: PgBoss.Job<T>) => Promise<void>;
};
