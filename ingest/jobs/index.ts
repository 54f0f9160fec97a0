import type { JobDefinition } from "./types";
import { importUploadJob } from "./import-upload";
import { evaluateAlertsJob, sendMailJob, weeklyDigestJob } from "./alerts";
import { renderBriefJob } from "./render-brief";

/** Every job the worker runs. Add a line here when you add a job module. */
export const JOBS: JobDefinition<never>[] = [
  importUploadJob,
  evaluateAlertsJob as JobDefinition<never>,
  sendMailJob as JobDefinition<never>,
  weeklyDigestJob as JobDefinition<never>,
  renderBriefJob as JobDefinition<never>,
];
