/**
 * Alert jobs: evaluate-alerts (data { siteId } or {} for every site; also daily), send-mail (one
 * outbox row; throws on SMTP failure so pg-boss retries with backoff) and the weekly digest.
 */
import { z } from "zod";
import { getDb } from "@/db";
import { evaluateAllSites, evaluateSite } from "@/lib/alerts/evaluate";
import { runWeeklyDigest } from "@/lib/alerts/digest";
import { sendOutboxRow } from "@/lib/alerts/outbox";
import { QUEUES } from "../queue";
import type { JobDefinition } from "./types";

const evaluateData = z.object({ siteId: z.string().uuid().optional() }).passthrough();
const sendData = z.object({ outboxId: z.string().uuid() });

export const evaluateAlertsJob: JobDefinition<{ siteId?: string }> = {
  name: QUEUES.evaluateAlerts,
  // Daily at 15:00 UTC: after dawn at every site from the Pacific to the Rockies.
  cron: "0 15 * * *",
  handler: async (data) => {
    const { siteId } = evaluateData.parse(data ?? {});
    if (siteId) await evaluateSite(siteId);
    else await evaluateAllSites();
  },
};

export const sendMailJob: JobDefinition<{ outboxId: string }> = {
  name: QUEUES.sendMail,
  handler: async (data) => {
    const { outboxId } = sendData.parse(data);
    await sendOutboxRow(getDb(), outboxId);
  },
};

export const weeklyDigestJob: JobDefinition<Record<string, never>> = {
  name: "weekly-digest",
  cron: "0 8 * * 1",
  handler: async () => {
    await runWeeklyDigest();
  },
};

export const ALERT_JOBS = [evaluateAlertsJob, sendMailJob, weeklyDigestJob];
