import type { JobDefinition } from "./types";

/** Every job the worker runs. Add a line here when you add a job module. */
export const JOBS: JobDefinition<never>[] = [];
