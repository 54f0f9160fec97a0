/**
 * The e-mail outbox: rows are written in the transaction that caused them; one send job per row
 * (QUEUES.sendMail, data { outboxId }) delivers it. A send claims the row first, so two workers
 * never send the same row, and a row already sent is skipped, so a retry never sends twice. On an
 * SMTP failure the row is marked failed with the error and the job throws, so pg-boss retries it
 * with backoff. A row stuck in `sending` (a worker died mid-send) is taken over after 10 minutes.
 */
import { randomBytes } from "node:crypto";
import { and, eq, sql } from "drizzle-orm";
import type { Transporter } from "nodemailer";
import type { Db } from "@/db";
import { emailOutbox, notificationSettings } from "@/db/schema";
import { QUEUES, enqueue } from "@/ingest/queue";
import { env } from "@/lib/env";
import { mailTransport } from "@/lib/mail/transport";

type Tx = Pick<Db, "insert" | "select" | "update" | "execute">;

export type OutboxInsert = {
  dedupeKey: string;
  alertEventId?: number | null;
  alertId?: string | null;
  userId?: string | null;
  recipient: string;
  subject: string;
  text: string;
  html: string;
  headers?: Record<string, string>;
};

/** Adds a row unless its event/recipient (or dedupe key) is already there; the new id or null. */
export async function addToOutbox(tx: Tx, row: OutboxInsert): Promise<string | null> {
  const [r] = await tx
    .insert(emailOutbox)
    .values({ ...row, headers: row.headers ?? {} })
    .onConflictDoNothing()
    .returning({ id: emailOutbox.id });
  return r?.id ?? null;
}

/** One send job per row. Idempotent: a duplicate job finds the row sent and does nothing. */
export async function enqueueOutbox(ids: string[]): Promise<void> {
  for (const id of ids) await enqueue(QUEUES.sendMail, { outboxId: id });
}

/**
 * Re-enqueues rows whose job may have been lost: pending for over 2 minutes (the process died
 * between commit and enqueue), or failed and untouched for an hour (retries ran out).
 */
export async function sweepOutbox(db: Pick<Db, "execute">): Promise<number> {
  const rows = await db.execute<{ id: string }>(sql`
    SELECT id FROM email_outbox
     WHERE (status = 'pending' AND created_at < now() - interval '2 minutes')
        OR (status = 'failed' AND claimed_at < now() - interval '1 hour' AND created_at > now() - interval '7 days')
        OR (status = 'sending' AND claimed_at < now() - interval '10 minutes')
     LIMIT 500`);
  await enqueueOutbox(rows.rows.map((r) => r.id));
  return rows.rows.length;
}

export type SendResult = "sent" | "already-sent";

/** Sends one outbox row. `transport` overrides the SMTP connection (tests, a second relay). */
export async function sendOutboxRow(
  db: Db,
  outboxId: string,
  transport: Pick<Transporter, "sendMail"> = mailTransport(),
): Promise<SendResult> {
  const [row] = await db
    .update(emailOutbox)
    .set({ status: "sending", claimedAt: new Date(), attempts: sql`${emailOutbox.attempts} + 1` })
    .where(
      and(
        eq(emailOutbox.id, outboxId),
        sql`(${emailOutbox.status} IN ('pending', 'failed') OR (${emailOutbox.status} = 'sending' AND ${emailOutbox.claimedAt} < now() - interval '10 minutes'))`,
      ),
    )
    .returning();
  if (!row) {
    const [cur] = await db
      .select({ status: emailOutbox.status })
      .from(emailOutbox)
      .where(eq(emailOutbox.id, outboxId))
      .limit(1);
    if (!cur) throw new Error(`outbox row ${outboxId} does not exist`);
    if (cur.status === "sent") return "already-sent";
    // Another worker holds a fresh claim: fail this job so it is retried later (and then skipped).
    throw new Error(`outbox row ${outboxId} is being sent by another worker`);
  }
  try {
    await transport.sendMail({
      from: env().MAIL_FROM,
      to: row.recipient,
      subject: row.subject,
      text: row.text,
      html: row.html,
      headers: row.headers,
      // A stable Message-ID: should a crash after SMTP acceptance cause a resend, clients can tell.
      messageId: `<${row.id}@nightmark.invalid>`,
    });
  } catch (err) {
    const message = (err as Error).message?.slice(0, 500) || "SMTP send failed";
    await db
      .update(emailOutbox)
      .set({ status: "failed", lastError: message })
      .where(eq(emailOutbox.id, row.id));
    throw err;
  }
  await db
    .update(emailOutbox)
    .set({ status: "sent", sentAt: new Date(), lastError: null })
    .where(eq(emailOutbox.id, row.id));
  return "sent";
}

/** A person's settings row, created with a fresh unsubscribe token when missing. */
export async function ensureNotificationSettings(tx: Tx, userId: string) {
  await tx
    .insert(notificationSettings)
    .values({ userId, unsubscribeToken: randomBytes(32).toString("base64url") })
    .onConflictDoNothing();
  const [s] = await tx
    .select()
    .from(notificationSettings)
    .where(eq(notificationSettings.userId, userId))
    .limit(1);
  return s!;
}
